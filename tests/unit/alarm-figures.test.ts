import { describe, expect, it } from "vitest";
import { alarmFigure } from "@/components/alarms/alarm-badges";

// How an alarm's value reads: level alarms in metres, health alarms in what their flag measures.
describe("alarmFigure", () => {
  it("writes level values in metres to the millimetre", () => {
    expect(alarmFigure(2.9523, "m", "h")).toBe("2.952 m");
  });

  it("writes health magnitudes in their own terms", () => {
    expect(alarmFigure(12900, null, "offline")).toBe("3 h 35 min silent");
    expect(alarmFigure(294, null, "stuck")).toBe("294 readings");
    expect(alarmFigure(0.0299, null, "drift")).toBe("29.9 mm");
    expect(alarmFigure(20, null, "crosstalk_risk")).toBe("20 ms apart");
  });

  it("writes a dash when there is no value", () => {
    expect(alarmFigure(null, null, "offline")).toBe("—");
  });
});
