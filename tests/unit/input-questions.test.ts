import { describe, it, expect } from "vitest";
import { unit as mathUnit } from "mathjs";
import {
  dipDateQuestion,
  dipLevelQuestion,
  mountingQuestions,
  temperatureSampleQuestions,
  temperatureSeriesQuestion,
} from "@/lib/input-checks/questions";

const now = new Date("2026-12-04T12:00:00Z");
const created = new Date("2026-11-01T09:00:00Z");

describe("dips", () => {
  it("refuses a dip dated in the future or before the tank had data; accepts one in between", () => {
    expect(dipDateQuestion(new Date("2026-12-05T12:00:00Z"), { now, assetCreatedAt: created })).toMatchObject({ field: "at", severity: "refuse", message: expect.stringMatching(/future/) });
    expect(dipDateQuestion(new Date("2020-06-01T08:00:00Z"), { now, assetCreatedAt: created })).toMatchObject({ severity: "refuse", message: expect.stringMatching(/before/) });
    expect(dipDateQuestion(new Date("2026-11-20T08:00:00Z"), { now, assetCreatedAt: created })).toBeNull();
    // A phone clock a few minutes off either way is not questioned (the 5 min slack); ten minutes is.
    expect(dipDateQuestion(new Date("2026-11-01T08:57:00Z"), { now, assetCreatedAt: created })).toBeNull();
    expect(dipDateQuestion(new Date("2026-11-01T08:50:00Z"), { now, assetCreatedAt: created })?.severity).toBe("refuse");
    expect(dipDateQuestion(new Date("2026-12-04T12:04:00Z"), { now, assetCreatedAt: created })).toBeNull();
    // Backfilled readings reach back further than the asset: a dip of that time is fine.
    expect(dipDateQuestion(new Date("2026-10-01T08:00:00Z"), { now, assetCreatedAt: created, earliestDataAt: new Date("2026-09-01T00:00:00Z") })).toBeNull();
  });

  it("refuses a dip deeper than the tank, naming the tank's height rather than an unrelated bound", () => {
    expect(dipLevelQuestion(99_999, 2.6)).toEqual({ field: "level_m", severity: "refuse", message: "The tank is 2.600 m deep; a dip reads at most that." });
    expect(dipLevelQuestion(-0.1, 2.6)?.severity).toBe("refuse");
    expect(dipLevelQuestion(1.2, 2.6)).toBeNull();
    // In the viewer's units: 2.6 m = 8.53 ft (mathjs).
    const feet = (m: number) => `${mathUnit(m, "m").toNumber("ft").toFixed(2)} ft`;
    expect(dipLevelQuestion(99, 2.6, feet)?.message).toBe("The tank is 8.53 ft deep; a dip reads at most that.");
  });
});

describe("temperature samples", () => {
  const hourly = (temps: number[]) => temps.map((airTempC, h) => ({ at: new Date(Date.UTC(2026, 10, 3, h)), airTempC }));

  it("questions 52 °C between 9 °C and 8 °C as a likely °F value (52 °F = 11.1 °C, mathjs), and not its neighbours", () => {
    const q = temperatureSampleQuestions(hourly([10, 9.5, 9, 52, 8, 7.5, 7]));
    expect(q).toHaveLength(1);
    expect(q[0]).toMatchObject({ index: 3, looksLikeFahrenheit: true, severity: "warn" });
    expect(mathUnit(52, "degF").toNumber("degC")).toBeCloseTo(11.11, 2);
    expect(q[0].message).toContain("11.1 °C");
  });

  it("questions a spike that is not °F without calling it °F, and leaves a day's ordinary swing alone", () => {
    const spike = temperatureSampleQuestions(hourly([10, 9.5, 9, -30, 8, 7.5, 7]));
    expect(spike).toMatchObject([{ index: 3, looksLikeFahrenheit: false }]);
    expect(temperatureSampleQuestions(hourly([4, 6, 9, 12, 15, 17, 18, 17, 14, 11, 8]))).toEqual([]);
  });

  it("asks whether a whole series was written in °F", () => {
    expect(temperatureSeriesQuestion(hourly([50, 52, 55, 54]))?.message).toMatch(/°F/);
    expect(temperatureSeriesQuestion(hourly([10, 12, 15]))).toBeNull();
  });
});

describe("mounting height", () => {
  it("refuses a sensor 1.5 m up inside a 3 m tank", () => {
    const q = mountingQuestions({ mountHeightM: 1.5, tankHeightM: 3 });
    expect(q).toHaveLength(1);
    expect(q[0]).toMatchObject({ field: "mount_height_m", severity: "refuse" });
    expect(q[0].message).toContain("inside a tank 3.000 m high");
  });

  it("warns when the bottom lies beyond the range or a full tank inside the blanking distance", () => {
    // Usable range about 2 cm to 4 m for low-cost modules (REFERENCES.md §2, common practice).
    const deep = mountingQuestions({ mountHeightM: 4.5, tankHeightM: 4.2, minRangeM: 0.02, maxRangeM: 4 });
    expect(deep).toMatchObject([{ severity: "warn", message: expect.stringMatching(/levels below 0\.500 m will read "no echo"/) }]);
    const tight = mountingQuestions({ mountHeightM: 3.01, tankHeightM: 3, minRangeM: 0.02, maxRangeM: 4 });
    expect(tight).toMatchObject([{ severity: "warn", message: expect.stringMatching(/top 0\.010 m will read "too close"/) }]);
    expect(mountingQuestions({ mountHeightM: 3.2, tankHeightM: 3, minRangeM: 0.02, maxRangeM: 4 })).toEqual([]);
  });
});
