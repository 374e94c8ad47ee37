import { describe, expect, it } from "vitest";
import { ALARM_STATES } from "@/lib/alarms/state-machine";
import { ALARM_STATE_WORDS, PRIORITY_GLYPHS, alarmStateWord, priorityText } from "@/lib/alarms/vocabulary";

describe("alarm vocabulary", () => {
  it("names every state with the ISA-18.2 / IEC 62682 state names (REFERENCES.md §4)", () => {
    // REFERENCES.md §4: Normal; Unacknowledged; Acknowledged; Returned-to-normal unacknowledged; Shelved;
    // Suppressed by design; Out of service.
    expect(Object.keys(ALARM_STATE_WORDS).sort()).toEqual([...ALARM_STATES].sort());
    expect(ALARM_STATE_WORDS).toEqual({
      normal: "Normal",
      unacknowledged: "Unacknowledged",
      acknowledged: "Acknowledged",
      returned_unacknowledged: "Returned to normal, unacknowledged",
      shelved: "Shelved",
      suppressed_by_design: "Suppressed by design",
      out_of_service: "Out of service",
    });
  });

  it("shows a state it does not know as it came, without underscores", () => {
    expect(alarmStateWord("latched_unacknowledged")).toBe("latched unacknowledged");
  });

  it("gives each priority its LOOK.md glyph and word", () => {
    // LOOK.md "Never colour alone": critical ◆, high ▲, medium ■, low ●.
    expect(PRIORITY_GLYPHS).toEqual({ critical: "◆", high: "▲", medium: "■", low: "●" });
    expect(priorityText("high")).toBe("▲ High");
  });
});
