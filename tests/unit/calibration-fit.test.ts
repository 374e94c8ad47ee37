import { describe, it, expect } from "vitest";
import * as ss from "simple-statistics";
import {
  applyCalibrationToRaw,
  fitCalibration,
  fitOffsetAndScale,
  fitOffsetOnly,
  levelFromRaw,
  residualsUnder,
  rmsUnder,
  SCALE_BOUNDS,
  spreadSentence,
  trueDistanceFromDip,
  undoCalibration,
  type CalibrationPoint,
} from "@/lib/calibration/fit";
import { applyCalibration } from "@/lib/physics/time-of-flight";
import { seededNormal } from "./seeded-normal";

const pts = (pairs: [number, number][]): CalibrationPoint[] => pairs.map(([rawDistanceM, trueDistanceM]) => ({ rawDistanceM, trueDistanceM }));

describe("least-squares offset and scale", () => {
  it("recovers an exact line and leaves no residual", () => {
    // Points on y = 1.02·x − 0.015 by construction (arithmetic by hand: 1.02·0.5 − 0.015 = 0.495, …).
    const points = pts([[0.5, 0.495], [1.2, 1.209], [2.75, 2.79]]);
    const fit = fitOffsetAndScale(points)!;
    expect(fit.scale).toBeCloseTo(1.02, 12);
    expect(fit.offsetM).toBeCloseTo(-0.015, 12);
    for (const r of residualsUnder(points, fit)) expect(Math.abs(r)).toBeLessThan(1e-12);
  });

  it("passes exactly through two dips", () => {
    // Two points fix a line: scale = (2.1 − 0.9)/(2.0 − 0.8) = 1, offset = 0.1 (by hand).
    const fit = fitOffsetAndScale(pts([[0.8, 0.9], [2.0, 2.1]]))!;
    expect(fit.scale).toBeCloseTo(1, 12);
    expect(fit.offsetM).toBeCloseTo(0.1, 12);
  });

  it("agrees with simple-statistics' linearRegression on noisy dips", () => {
    // simple-statistics linearRegression / linearRegressionLine [general-purpose library].
    const draw = seededNormal(2024);
    for (let trial = 0; trial < 20; trial++) {
      const n = 2 + trial;
      const pairs: [number, number][] = Array.from({ length: n }, (_, i) => {
        const x = 0.3 + (3.2 * i) / n + 0.05 * draw();
        return [x, 0.97 * x + 0.04 + 0.004 * draw()];
      });
      const ours = fitOffsetAndScale(pts(pairs))!;
      const theirs = ss.linearRegression(pairs);
      expect(ours.scale).toBeCloseTo(theirs.m, 10);
      expect(ours.offsetM).toBeCloseTo(theirs.b, 10);
      const line = ss.linearRegressionLine(theirs);
      residualsUnder(pts(pairs), ours).forEach((r, i) => expect(r).toBeCloseTo(pairs[i][1] - line(pairs[i][0]), 10));
    }
  });

  it("leaves residuals that sum to zero and are uncorrelated with the raw distance", () => {
    // Normal equations of ordinary least squares with an intercept: Σe = 0 and Σx·e = 0
    // (Draper & Smith, Applied Regression Analysis, ch. 1).
    const draw = seededNormal(7);
    const points = pts(Array.from({ length: 12 }, (_, i) => [0.4 + i * 0.2, 1.01 * (0.4 + i * 0.2) - 0.02 + 0.01 * draw()] as [number, number]));
    const fit = fitOffsetAndScale(points)!;
    const e = residualsUnder(points, fit);
    expect(Math.abs(ss.sum(e))).toBeLessThan(1e-12);
    expect(Math.abs(ss.sum(e.map((r, i) => r * points[i].rawDistanceM)))).toBeLessThan(1e-12);
    // The least-squares line has the smallest residual sum of squares: nudging it costs.
    const best = rmsUnder(points, fit);
    for (const d of [{ scale: 1e-3, offsetM: 0 }, { scale: 0, offsetM: 1e-3 }, { scale: -1e-3, offsetM: 1e-3 }]) {
      expect(rmsUnder(points, { scale: fit.scale + d.scale, offsetM: fit.offsetM + d.offsetM })).toBeGreaterThan(best);
    }
  });

  it("refuses points that cannot fix a slope", () => {
    expect(fitOffsetAndScale(pts([[1, 1.1]]))).toBeNull();
    expect(fitOffsetAndScale(pts([[1, 1.1], [1, 1.2]]))).toBeNull();
    expect(fitOffsetAndScale(pts([[1, Number.NaN], [2, 2]]))).toBeNull();
  });
});

describe("choosing the fit", () => {
  it("fits offset and scale when the dips are spread out", () => {
    const result = fitCalibration(pts([[0.5, 0.52], [2.5, 2.56]]), 1);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.fit.mode).toBe("offset_and_scale");
    // By hand: scale = (2.56 − 0.52)/(2.5 − 0.5) = 1.02, offset = 0.52 − 1.02·0.5 = 0.01.
    expect(result.fit.scale).toBeCloseTo(1.02, 12);
    expect(result.fit.offsetM).toBeCloseTo(0.01, 12);
    expect(result.fit.rmsM).toBeLessThan(1e-12);
    expect(result.fit.n).toBe(2);
  });

  it("fits the offset alone, keeping the current scale, when the dips lie close together", () => {
    const points = pts([[1.5, 1.53], [1.51, 1.538], [1.52, 1.552]]);
    const result = fitCalibration(points, 1.01);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.fit.mode).toBe("offset_only");
    expect(result.fit.scale).toBe(1.01);
    // Least squares with the slope held: offset = mean(y − s·x) (simple-statistics mean).
    expect(result.fit.offsetM).toBeCloseTo(ss.mean(points.map((p) => p.trueDistanceM - 1.01 * p.rawDistanceM)), 12);
    expect(ss.sum(result.fit.residualsM)).toBeCloseTo(0, 12);
    expect(result.fit.note).toMatch(/Only the offset/);
    expect(fitOffsetOnly(points, 0)).toBeNull();
  });

  it("tells the dips' spread and the sensor's spread apart (the dips 33 mm apart, the sensor 6 mm)", () => {
    // Raw distances 1.500 and 1.506 m; dipped distances 1.520 and 1.553 m: ranges 6 and 33 mm (computed).
    const result = fitCalibration(pts([[1.5, 1.52], [1.506, 1.553]]), 1);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.fit.dipSpreadM).toBeCloseTo(0.033, 12);
    expect(result.fit.sensorSpreadM).toBeCloseTo(0.006, 12);
    expect(spreadSentence(result.fit.dipSpreadM, result.fit.sensorSpreadM)).toBe("The dips span 33 mm; the sensor's readings at their times lie within 6 mm of each other.");
    expect(result.fit.note).toMatch(/readings at the dips lie within 6 mm of each other, too close to fit a scale\./);
  });

  it("refuses one dip and an implausible scale", () => {
    expect(fitCalibration(pts([[1, 1]]), 1)).toEqual({ ok: false, reason: expect.stringMatching(/at least two dips/) });
    const wild = fitCalibration(pts([[0.5, 0.5], [2.5, 3.5]]), 1);
    expect(wild.ok).toBe(false);
    if (!wild.ok) expect(wild.reason).toContain(String(SCALE_BOUNDS.max));
  });
});

describe("distance-domain conventions", () => {
  it("turns a dip into the distance the sensor should see", () => {
    // Sensor face 3.00 m above the bottom, timing point 0.02 m behind it, dipped level 1.20 m → 1.82 m (by hand).
    expect(trueDistanceFromDip(1.2, 3, 0.02)).toBeCloseTo(1.82, 12);
  });

  it("undoes the calibration the worker applies", () => {
    // The worker: calibrated = scale·raw + offset (lib/physics applyCalibration), then minus the face offset.
    const current = { offsetM: 0.013, scale: 0.992 };
    for (const raw of [0.05, 1.234, 3.9]) {
      const applied = applyCalibration(raw, current);
      expect(applied.ok).toBe(true);
      if (!applied.ok) continue;
      const fromFace = applied.value - 0.02;
      expect(applyCalibrationToRaw(raw, 0.02, current)).toBeCloseTo(fromFace, 12);
      expect(undoCalibration(fromFace, 0.02, current)).toBeCloseTo(raw, 12);
    }
  });

  it("makes the sensor read the dipped levels after a fit", () => {
    // A sensor reading 1.5 % long with a 12 mm zero error; dips at three levels of a 3 m tank.
    const mount = 3;
    const face = 0.01;
    const truth = { scale: 1 / 1.015, offsetM: -0.012 };
    const dips = [0.4, 1.3, 2.6];
    const points = dips.map((level) => {
      const y = trueDistanceFromDip(level, mount, face);
      return { rawDistanceM: (y - truth.offsetM) / truth.scale, trueDistanceM: y };
    });
    const result = fitCalibration(points, 1);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.fit.scale).toBeCloseTo(truth.scale, 12);
    expect(result.fit.offsetM).toBeCloseTo(truth.offsetM, 12);
    points.forEach((p, i) => expect(levelFromRaw(p.rawDistanceM, mount, face, result.fit)).toBeCloseTo(dips[i], 12));
  });
});
