import { describe, expect, it } from "vitest";
import { alarmFigure } from "@/components/alarms/alarm-badges";
import { figuresFor } from "@/lib/format/figures";

const si = figuresFor({ system: "si", locale: "en-GB" });
const us = figuresFor({ system: "us", locale: "en-GB" });

// How an alarm's value reads: level alarms in metres, health alarms in what their flag measures.
describe("alarmFigure", () => {
  it("writes level values in metres to the millimetre", () => {
    expect(alarmFigure(si, 2.9523, "m", "h")).toBe("2.952\u00a0m");
  });

  it("writes level values in feet for a US-customary reader", () => {
    // 2.9523 m = 9.686 ft (1 ft = 0.3048 m exactly, NIST SP 811 Appendix B): to 0.01 ft without an uncertainty.
    expect(alarmFigure(us, 2.9523, "m", "h")).toBe("9.69\u00a0ft");
  });

  it("writes health magnitudes in their own terms", () => {
    expect(alarmFigure(si, 12900, null, "offline")).toBe("3 h 35 min silent");
    expect(alarmFigure(si, 294, null, "stuck")).toBe("294 readings");
    expect(alarmFigure(si, 0.0299, null, "drift")).toBe("29.9 mm");
    expect(alarmFigure(si, 20, null, "crosstalk_risk")).toBe("20 ms apart");
  });

  it("writes a dash when there is no value", () => {
    expect(alarmFigure(si, null, null, "offline")).toBe("—");
  });
});
