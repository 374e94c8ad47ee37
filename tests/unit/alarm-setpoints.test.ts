import { describe, it, expect } from "vitest";
import { linearRegression, median } from "simple-statistics";
import {
  LEVEL_DEADBAND_PCT_OF_SPAN,
  LEVEL_ON_DELAY_S,
  type LevelSample,
  type SetpointDef,
  type SetpointState,
  evaluateLevelSetpoints,
  evaluateRateOfChange,
  evaluateSetpoint,
  initialSetpointState,
  levelDeadbandM,
  validateSetpoints,
} from "@/lib/alarms/setpoints";

const T0 = Date.parse("2026-03-14T06:00:00Z");
const at = (seconds: number) => T0 + seconds * 1000;

// A tank 4 m tall: deadband 5 % of span = 0.2 m, on-delay 60 s (REFERENCES.md §4 values, see below).
const TANK_M = 4;
const high: SetpointDef = { key: "h", value: 3.5, deadband: 0.2, onDelayS: 60, priority: "medium", enabled: true };
const low: SetpointDef = { key: "l", value: 0.8, deadband: 0.2, onDelayS: 60, priority: "medium", enabled: true };

function feed(def: SetpointDef, samples: [number, number][], start: SetpointState = initialSetpointState()) {
  let state = start;
  return samples.map(([seconds, value]) => {
    const r = evaluateSetpoint(def, state, { at: at(seconds), value });
    state = r.state;
    return r;
  });
}

describe("level deadband and on-delay defaults", () => {
  it("uses 5 % of span for level (REFERENCES.md §4: published, sources differ; some sources 2 %)", () => {
    expect(LEVEL_DEADBAND_PCT_OF_SPAN).toBe(5);
    expect(levelDeadbandM(TANK_M)).toBeCloseTo(0.2, 12);
    expect(levelDeadbandM(TANK_M, 2)).toBeCloseTo(0.08, 12);
    expect(() => levelDeadbandM(0)).toThrow(RangeError);
  });

  it("uses 60 s on-delay for level (REFERENCES.md §4: from memory)", () => {
    expect(LEVEL_ON_DELAY_S).toBe(60);
  });
});

describe("evaluateSetpoint — on-delay (the condition must hold for the delay)", () => {
  it("activates a high alarm only once the level has stayed at or above the setpoint for 60 s", () => {
    const r = feed(high, [
      [0, 3.6],
      [30, 3.7],
      [59, 3.6],
      [60, 3.6],
    ]);
    expect(r.map((x) => x.active)).toEqual([false, false, false, true]);
    expect(r.map((x) => x.changed)).toEqual([false, false, false, true]);
  });

  it("restarts the delay when one sample falls back below the setpoint", () => {
    const r = feed(high, [
      [0, 3.6],
      [30, 3.49],
      [40, 3.6],
      [90, 3.6],
      [100, 3.6],
    ]);
    expect(r.map((x) => x.active)).toEqual([false, false, false, false, true]);
  });

  it("counts a sample exactly at the setpoint as in alarm", () => {
    expect(feed(high, [[0, 3.5], [60, 3.5]]).at(-1)?.active).toBe(true);
    expect(feed(low, [[0, 0.8], [60, 0.8]]).at(-1)?.active).toBe(true);
  });

  it("activates at once with no on-delay", () => {
    expect(feed({ ...high, onDelayS: 0 }, [[0, 3.5]])[0].active).toBe(true);
  });
});

describe("evaluateSetpoint — deadband (a high clears below setpoint − deadband, a low above setpoint + deadband)", () => {
  it("keeps a high alarm active inside the deadband and clears it below 3.3 m", () => {
    const r = feed({ ...high, onDelayS: 0 }, [
      [0, 3.6],
      [10, 3.45],
      [20, 3.3], // exactly setpoint − deadband: not yet below
      [30, 3.29],
      [40, 3.45], // back inside the deadband but below the setpoint: stays clear
    ]);
    expect(r.map((x) => x.active)).toEqual([true, true, true, false, false]);
    expect(r[3].changed).toBe(true);
  });

  it("mirrors the rule for a low alarm: clears only above 1.0 m", () => {
    const r = feed({ ...low, onDelayS: 0 }, [
      [0, 0.7],
      [10, 0.95],
      [20, 1.0],
      [30, 1.01],
    ]);
    expect(r.map((x) => x.active)).toEqual([true, true, true, false]);
  });

  it("does not chatter on ripple around the setpoint once active", () => {
    const ripple: [number, number][] = Array.from({ length: 20 }, (_, i) => [60 + i * 10, 3.5 + (i % 2 ? -0.1 : 0.1)]);
    const r = feed(high, [[0, 3.6], ...ripple]);
    expect(r.slice(1).every((x) => x.active)).toBe(true);
    expect(r.filter((x) => x.changed)).toHaveLength(1);
  });
});

describe("evaluateSetpoint — resumable and defensive", () => {
  it("gives the same answers when the state is stored as JSON between samples", () => {
    const samples: [number, number][] = [
      [0, 3.6],
      [20, 3.7],
      [40, 3.4],
      [50, 3.8],
      [110, 3.9],
      [120, 3.2],
    ];
    const straight = feed(high, samples).map((r) => r.active);
    let state = initialSetpointState();
    const resumed = samples.map(([s, value]) => {
      const r = evaluateSetpoint(high, JSON.parse(JSON.stringify(state)) as SetpointState, { at: at(s), value });
      state = r.state;
      return r.active;
    });
    expect(resumed).toEqual(straight);
    expect(straight).toEqual([false, false, false, false, true, false]);
  });

  it("ignores a sample older than the last one and a non-finite value", () => {
    const [first] = feed(high, [[100, 3.6]]);
    const old = evaluateSetpoint(high, first.state, { at: at(50), value: 3.6 });
    expect(old.ignored).toBe("out_of_order");
    expect(old.state).toBe(first.state);
    const nan = evaluateSetpoint(high, first.state, { at: at(200), value: Number.NaN });
    expect(nan.ignored).toBe("invalid_value");
    expect(nan.state).toBe(first.state);
  });

  it("a disabled setpoint is never active and clears an active one", () => {
    const [active] = feed({ ...high, onDelayS: 0 }, [[0, 3.9]]);
    const r = evaluateSetpoint({ ...high, enabled: false }, active.state, { at: at(10), value: 3.9 });
    expect(r).toMatchObject({ active: false, changed: true });
  });

  it("evaluates H and HH of one tank on a rising level", () => {
    const setpoints = {
      h: { value: 3.5, deadband: 0.2, onDelayS: 0, priority: "medium" as const, enabled: true },
      hh: { value: 3.8, deadband: 0.2, onDelayS: 0, priority: "critical" as const, enabled: true },
      l: { value: 0.8, deadband: 0.2, onDelayS: 0, priority: "medium" as const, enabled: true },
    };
    const r1 = evaluateLevelSetpoints(setpoints, {}, { at: at(0), value: 3.6 });
    expect([r1.h?.active, r1.hh?.active, r1.l?.active, r1.ll]).toEqual([true, false, false, undefined]);
    const r2 = evaluateLevelSetpoints(setpoints, { h: r1.h?.state, hh: r1.hh?.state }, { at: at(10), value: 3.85 });
    expect([r2.h?.active, r2.hh?.active, r2.hh?.changed]).toEqual([true, true, true]);
  });
});

describe("evaluateRateOfChange (leak / theft: falling faster than the limit)", () => {
  // A level falling 0.1 m/h, read every 5 min for an hour.
  const line: LevelSample[] = Array.from({ length: 13 }, (_, i) => ({ at: at(i * 300), value: 2 - (0.1 * i * 300) / 3600 }));

  it("measures the slope of a clean line as least squares does (simple-statistics linearRegression)", () => {
    const ols = linearRegression(line.map((s) => [(s.at as number) / 3.6e6, s.value]));
    const r = evaluateRateOfChange(line, 0.05);
    expect(r.status).toBe("ok");
    expect(r.slopeMPerH).toBeCloseTo(ols.m, 9);
    expect(r.slopeMPerH).toBeCloseTo(-0.1, 9);
    expect(r.active).toBe(true);
    expect(evaluateRateOfChange(line, 0.2).active).toBe(false);
    expect(r).toMatchObject({ samplesUsed: 13, spanS: 3600 });
  });

  it("is the median of pairwise slopes, so one false echo at the end does not raise a leak alarm", () => {
    const steady: LevelSample[] = Array.from({ length: 13 }, (_, i) => ({ at: at(i * 300), value: 2 + (i % 2 ? 0.004 : -0.004) }));
    const spiked = [...steady.slice(0, -1), { at: at(3600), value: 1.0 }];
    const xs = spiked.map((s) => (s.at as number) / 3.6e6);
    const ys = spiked.map((s) => s.value);
    const pairwise: number[] = [];
    for (let i = 0; i < xs.length; i++) for (let j = i + 1; j < xs.length; j++) pairwise.push((ys[j] - ys[i]) / (xs[j] - xs[i]));
    const r = evaluateRateOfChange(spiked, 0.05);
    // Checked against simple-statistics' median of the same pairwise slopes.
    expect(r.slopeMPerH).toBeCloseTo(median(pairwise), 9);
    expect(r.active).toBe(false);
    // Least squares (simple-statistics) and the end-to-end difference both read that spike as a leak.
    expect(linearRegression(xs.map((x, i) => [x, ys[i]])).m).toBeLessThan(-0.05);
    expect((ys.at(-1)! - ys[0]) / (xs.at(-1)! - xs[0])).toBeLessThan(-0.05);
  });

  it("never activates on a rising level (a refill)", () => {
    const refill = line.map((s) => ({ ...s, value: 4 - s.value }));
    const r = evaluateRateOfChange(refill, 0.05);
    expect(r.slopeMPerH).toBeCloseTo(0.1, 9);
    expect(r.active).toBe(false);
  });

  it("answers insufficient_data for too few samples or too short a span", () => {
    expect(evaluateRateOfChange(line.slice(0, 5), 0.05)).toMatchObject({ status: "insufficient_data", active: false, slopeMPerH: null });
    const shortSpan = Array.from({ length: 20 }, (_, i) => ({ at: at(i * 60), value: 2 - i * 0.01 }));
    expect(evaluateRateOfChange(shortSpan, 0.05)).toMatchObject({ status: "insufficient_data", spanS: 1140 });
    expect(evaluateRateOfChange([], 0.05).status).toBe("insufficient_data");
  });

  it("uses only the trailing window and skips non-finite levels", () => {
    const older = Array.from({ length: 12 }, (_, i) => ({ at: at(-7200 + i * 300), value: 10 - i }));
    const r = evaluateRateOfChange([...older, ...line, { at: at(1800), value: Number.NaN }], 0.05);
    expect(r.samplesUsed).toBe(13);
    expect(r.slopeMPerH).toBeCloseTo(-0.1, 9);
    expect(evaluateRateOfChange(line, 0.05, { windowS: 1200, minSpanS: 600, minSamples: 3 })).toMatchObject({
      status: "ok",
      samplesUsed: 5,
      spanS: 1200,
    });
  });

  it("rejects a non-positive limit", () => {
    expect(() => evaluateRateOfChange(line, 0)).toThrow(RangeError);
  });
});

describe("validateSetpoints (LL < L < H < HH inside 0…tank height)", () => {
  it("accepts an ordered set inside the tank, and a partial set", () => {
    expect(validateSetpoints({ ll: 0.4, l: 0.8, h: 3.5, hh: 3.8 }, TANK_M)).toEqual({ ok: true, fieldErrors: {} });
    expect(validateSetpoints({ l: 0.8, hh: null }, TANK_M)).toEqual({ ok: true, fieldErrors: {} });
    expect(validateSetpoints({ ll: 0, hh: 4 }, TANK_M).ok).toBe(true);
  });

  it("names both fields of a pair out of order", () => {
    expect(validateSetpoints({ ll: 0.4, l: 0.8, h: 3.9, hh: 3.8 }, TANK_M)).toEqual({
      ok: false,
      fieldErrors: { h: "H must be below HH (3.8 m).", hh: "HH must be above H (3.9 m)." },
    });
    expect(validateSetpoints({ l: 1, h: 1 }, TANK_M).fieldErrors).toEqual({
      l: "L must be below H (1 m).",
      h: "H must be above L (1 m).",
    });
  });

  it("compares across a setpoint that is not set", () => {
    expect(validateSetpoints({ ll: 2, h: 1.5 }, TANK_M).fieldErrors).toEqual({
      ll: "LL must be below H (1.5 m).",
      h: "H must be above LL (2 m).",
    });
  });

  it("reports a value outside the tank before its ordering", () => {
    expect(validateSetpoints({ l: -0.1, h: 4.25, hh: 4.1 }, TANK_M).fieldErrors).toEqual({
      l: "L must be between 0 m and the tank height (4 m).",
      h: "H must be between 0 m and the tank height (4 m).",
      hh: "HH must be between 0 m and the tank height (4 m).",
    });
    expect(validateSetpoints({ h: Number.NaN }, TANK_M).fieldErrors).toEqual({ h: "H must be a number of metres." });
    expect(() => validateSetpoints({ h: 1 }, 0)).toThrow(RangeError);
  });
});
