import { describe, expect, it } from "vitest";
import { buildTrend, forecastLine, sourceForPeriod, uncompensatedDistance, type SeriesPoint } from "@/components/assets/asset-live-series";

const IDENTITY = { offsetM: 0, scale: 1, faceOffsetM: 0 };

describe("uncompensatedDistance", () => {
  // REFERENCES.md §2 [computed]: 5 831 µs → 1.00064 m at 20 °C with 331.3·√(1 + T/273.15).
  // The same echo at 0 °C is 331.3 × 5 831 µs / 2 = 0.965907 m (computed by hand); an
  // uncompensated unit, assuming 20 °C, reports the 20 °C row.
  it("rescales a compensated distance to the speed at 20 °C", () => {
    expect(uncompensatedDistance(0.9659070, 331.3, IDENTITY)).toBeCloseTo(1.00064, 5);
  });
  it("keeps the calibration and face offset outside the rescaled timed part", () => {
    // distance = scale·timed + offset − face = 1.01 × 0.965907 + 0.02 − 0.01; uncompensated = 1.01 × 1.00064 + 0.01 (by hand).
    const cal = { offsetM: 0.02, scale: 1.01, faceOffsetM: 0.01 };
    expect(uncompensatedDistance(1.01 * 0.965907 + 0.01, 331.3, cal)).toBeCloseTo(1.01 * 1.00064 + 0.01, 5);
  });
  it("changes nothing at the nominal temperature", () => {
    expect(uncompensatedDistance(1.234, 331.3 * Math.sqrt(1 + 20 / 273.15), IDENTITY)).toBeCloseTo(1.234, 12);
  });
  it("refuses a zero speed", () => {
    expect(() => uncompensatedDistance(1, 0, IDENTITY)).toThrow(RangeError);
  });
});

describe("buildTrend", () => {
  const point = (atMs: number, distanceM: number, airTempC: number, compensated = true): SeriesPoint => ({
    atMs,
    distanceM,
    levelM: null,
    airTempC,
    speedMs: null,
    uncertaintyM: 0.005,
    compensated,
  });

  it("draws a tank as mount height − distance, with the band two uncertainties wide", () => {
    const t = buildTrend([point(2000, 1.2, 20), point(1000, 1.0, 20)], { quantity: "level", mountHeightM: 3, calibration: IDENTITY });
    expect(t.compensated.map(([at]) => at)).toEqual([1000, 2000]);
    expect(t.compensated[0][1]).toBeCloseTo(2.0, 12);
    expect(t.bandLow[0][1]).toBeCloseTo(1.995, 12);
    expect(t.bandWidth[0][1]).toBeCloseTo(0.01, 12);
    // At 20 °C compensated and uncompensated agree.
    expect(t.raw[0][1]).toBeCloseTo(2.0, 9);
  });
  it("leaves out the raw line for units that compensate themselves", () => {
    const t = buildTrend([point(1000, 1.0, 0, false)], { quantity: "distance", mountHeightM: null, calibration: IDENTITY });
    expect(t.raw[0][1]).toBeNull();
    expect(t.compensated[0][1]).toBe(1.0);
  });
  it("uses the speed from the air temperature when the series has none", () => {
    // 0 °C: the uncompensated distance is 0.965907 m × 343.215 / 331.3 = 1.00064 m (REFERENCES.md §2).
    const t = buildTrend([point(1000, 0.965907, 0)], { quantity: "distance", mountHeightM: null, calibration: IDENTITY });
    expect(t.raw[0][1]).toBeCloseTo(1.00064, 5);
  });
});

describe("forecastLine", () => {
  // Rectangular tank 2 m × 1.5 m: V = l·w·h, so 1 000 L is 1/3 m of level (computed by hand).
  const geometry = { shape: "rectangular" as const, length_m: 2, width_m: 1.5, height_m: 2.8 };
  it("runs from the level now to the reorder level at the reorder date", () => {
    const line = forecastLine({ geometry, volumeNowL: 6000, reorderVolumeL: 2100, nowMs: 0, reorderAtMs: 86_400_000 }, 3);
    expect(line).toHaveLength(4);
    expect(line[0][0]).toBe(0);
    expect(line[0][1]).toBeCloseTo(2.0, 6);
    expect(line[3][0]).toBe(86_400_000);
    expect(line[3][1]).toBeCloseTo(0.7, 6);
    expect(line[1][1]).toBeCloseTo((6000 - 1300) / 3000, 6);
  });
  it("is empty when the reorder date is not ahead", () => {
    expect(forecastLine({ geometry, volumeNowL: 2000, reorderVolumeL: 2100, nowMs: 10, reorderAtMs: 10 })).toEqual([]);
  });
});

describe("sourceForPeriod", () => {
  const day = 86_400_000;
  it("reads measurements for a day, 5-minute rollups to a week and hourly ones beyond", () => {
    expect(sourceForPeriod(0, day)).toEqual({ kind: "raw" });
    expect(sourceForPeriod(0, 7 * day)).toEqual({ kind: "rollup", bucket: "5m" });
    expect(sourceForPeriod(0, 30 * day)).toEqual({ kind: "rollup", bucket: "1h" });
  });
});
