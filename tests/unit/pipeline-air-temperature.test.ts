import { describe, it, expect } from "vitest";
import { buildTemperatureSeries, interpolateTemperature, resolveAirTemperature } from "@/lib/worker/compute/air-temperature";
import { PIPELINE_SETTINGS } from "@/lib/worker/compute/settings";
import { AIR_TEMPERATURE_DRIFT_K_PER_H, AIR_TEMPERATURE_UNCERTAINTY_K } from "@/lib/uncertainty/air-temperature";

const MIN = 60_000;
const series = buildTemperatureSeries([
  { atMs: 30 * MIN, airTempC: 14 },
  { atMs: 0, airTempC: 10 },
  { atMs: 60 * MIN, airTempC: Number.NaN },
  { atMs: 600 * MIN, airTempC: 30 },
]);

describe("site temperature samples", () => {
  it("sorts the samples and drops the ones that are not numbers", () => {
    expect(Array.from(series.temps)).toEqual([10, 14, 30]);
  });

  it("interpolates linearly between neighbours and returns a sample's own time exactly", () => {
    expect(interpolateTemperature(series, 15 * MIN)).toBe(12);
    expect(interpolateTemperature(series, 30 * MIN)).toBe(14);
  });

  it("takes the nearest sample across a gap too wide to interpolate, within an hour of it", () => {
    // 30 → 600 min is 9.5 h, over the 6 h limit.
    expect(PIPELINE_SETTINGS.tempInterpolationMaxGapS).toBe(6 * 3600);
    expect(interpolateTemperature(series, 80 * MIN)).toBe(14);
    expect(interpolateTemperature(series, 560 * MIN)).toBe(30);
    expect(interpolateTemperature(series, 300 * MIN)).toBeNull();
    expect(interpolateTemperature(series, -90 * MIN)).toBeNull();
    expect(interpolateTemperature(buildTemperatureSeries([]), 0)).toBeNull();
  });
});

describe("air temperature precedence (PRODUCT.md)", () => {
  const u = AIR_TEMPERATURE_UNCERTAINTY_K;
  it("reading, then samples, then the site's fixed value, then 20 °C, each with its uncertainty", () => {
    expect(resolveAirTemperature({ readingTempC: 7, atMs: 15 * MIN, siteSeries: series, siteFixedC: 3 })).toMatchObject({ tempC: 7, source: "reading", uncertaintyK: u.reading });
    // Between samples of 10 and 14 °C, 15 min from each: the base, half the 4 K spread and 15 min of
    // drift as rectangular half-widths (GUM §4.3.7), in quadrature (computed).
    const sampled = Math.sqrt(u.site_samples ** 2 + (2 / Math.sqrt(3)) ** 2 + ((AIR_TEMPERATURE_DRIFT_K_PER_H * 0.25) / Math.sqrt(3)) ** 2);
    expect(resolveAirTemperature({ readingTempC: null, atMs: 15 * MIN, siteSeries: series, siteFixedC: 3 })).toMatchObject({ tempC: 12, source: "site_samples" });
    expect(resolveAirTemperature({ readingTempC: null, atMs: 15 * MIN, siteSeries: series, siteFixedC: 3 }).uncertaintyK).toBeCloseTo(sampled, 12);
    expect(resolveAirTemperature({ readingTempC: null, atMs: 30 * MIN, siteSeries: series, siteFixedC: 3 }).uncertaintyK).toBe(u.site_samples);
    expect(resolveAirTemperature({ readingTempC: null, atMs: 300 * MIN, siteSeries: series, siteFixedC: 3 })).toMatchObject({ tempC: 3, source: "site_fixed", uncertaintyK: u.site_fixed });
    expect(resolveAirTemperature({ readingTempC: null, atMs: 0, siteSeries: null, siteFixedC: null })).toMatchObject({ tempC: 20, source: "default", uncertaintyK: u.default });
  });

  it("passes over a reading's impossible temperature and notes it", () => {
    const t = resolveAirTemperature({ readingTempC: 400, atMs: 0, siteSeries: null, siteFixedC: 8 });
    expect(t).toMatchObject({ tempC: 8, source: "site_fixed" });
    expect(t.note).toMatch(/400/);
  });
});
