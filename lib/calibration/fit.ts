// Calibration of a channel from manual dips, in the distance domain the worker uses:
//   calibrated distance = scale · raw distance + offset,   distance from the face = calibrated − face offset,
//   level = mount height − distance from the face.
// A dip gives the true level, hence the true calibrated distance y = mount height + face offset − dip level;
// the sensor's raw distance x at the dip's time is the stored raw distance (or the stored calibrated
// distance with the current calibration undone). An ordinary least-squares line y = scale·x + offset
// through the pairs is the new calibration; its residuals are what is left between sensor and dips.

export interface Calibration {
  offsetM: number;
  scale: number;
}

/** One dip paired with the sensor: x is the raw (uncalibrated) distance, y the distance the dip implies. */
export interface CalibrationPoint {
  rawDistanceM: number;
  trueDistanceM: number;
}

export type FitMode = "offset_and_scale" | "offset_only";

export interface CalibrationFit extends Calibration {
  mode: FitMode;
  n: number;
  /** Per point, in the order given: level after calibration − dipped level (= y − ŷ), metres. */
  residualsM: number[];
  /** Root mean square of the residuals, metres. */
  rmsM: number;
  /** Why the fit took the mode it did, for the screen. */
  note: string | null;
  /** Range of the levels the dips read, and of the sensor's raw distances at their times, metres: told apart, since they differ when a dip or its time is wrong. */
  dipSpreadM: number;
  sensorSpreadM: number;
}

export type FitResult = { ok: true; fit: CalibrationFit } | { ok: false; reason: string };

// Two dips taken at nearly the same level say nothing about the scale; below this spread of raw
// distances only the offset is fitted and the current scale is kept (own choice: with dips good to a few
// millimetres, a 5 cm lever fixes the scale to a few per cent at best).
export const MIN_SPREAD_FOR_SCALE_M = 0.05;

// Sound speed changes about 0.18 % a kelvin (REFERENCES.md §2), so even a 60 K error moves the scale
// by about 11 %: a fitted scale beyond these bounds means a wrong dip, not a sensor to correct.
export const SCALE_BOUNDS = { min: 0.85, max: 1.15 } as const;

/** True distance from the face implied by a dipped level. */
export function trueDistanceFromDip(dipLevelM: number, mountHeightM: number, faceOffsetM: number): number {
  return mountHeightM + faceOffsetM - dipLevelM;
}

/** The raw distance behind a stored calibrated distance (the current calibration undone). */
export function undoCalibration(calibratedDistanceM: number, faceOffsetM: number, current: Calibration): number {
  return (calibratedDistanceM + faceOffsetM - current.offsetM) / current.scale;
}

/** Distance from the face for a raw distance under a calibration (what the worker computes). */
export function applyCalibrationToRaw(rawDistanceM: number, faceOffsetM: number, calibration: Calibration): number {
  return calibration.scale * rawDistanceM + calibration.offsetM - faceOffsetM;
}

/** Level the sensor would report for a raw distance under a calibration. */
export function levelFromRaw(rawDistanceM: number, mountHeightM: number, faceOffsetM: number, calibration: Calibration): number {
  return mountHeightM - applyCalibrationToRaw(rawDistanceM, faceOffsetM, calibration);
}

function rms(values: number[]): number {
  return values.length ? Math.sqrt(values.reduce((s, v) => s + v * v, 0) / values.length) : 0;
}

/** Residuals (y − ŷ) of the points under a calibration: the level error each dip sees. */
export function residualsUnder(points: readonly CalibrationPoint[], calibration: Calibration): number[] {
  return points.map((p) => p.trueDistanceM - (calibration.scale * p.rawDistanceM + calibration.offsetM));
}

export function rmsUnder(points: readonly CalibrationPoint[], calibration: Calibration): number {
  return rms(residualsUnder(points, calibration));
}

function range(values: number[]): number {
  return Math.max(...values) - Math.min(...values);
}

const mm = (m: number) => `${(m * 1000).toFixed(0)} mm`;

/** "The dips span 33 mm; the sensor's readings at their times lie within 6 mm of each other." */
export function spreadSentence(dipSpreadM: number, sensorSpreadM: number): string {
  return `The dips span ${mm(dipSpreadM)}; the sensor's readings at their times lie within ${mm(sensorSpreadM)} of each other.`;
}

function finitePoints(points: readonly CalibrationPoint[]): boolean {
  return points.every((p) => Number.isFinite(p.rawDistanceM) && Number.isFinite(p.trueDistanceM));
}

/** Ordinary least squares y = scale·x + offset, centred on the means for numerical stability. */
export function fitOffsetAndScale(points: readonly CalibrationPoint[]): Calibration | null {
  const n = points.length;
  if (n < 2 || !finitePoints(points)) return null;
  const meanX = points.reduce((s, p) => s + p.rawDistanceM, 0) / n;
  const meanY = points.reduce((s, p) => s + p.trueDistanceM, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (const p of points) {
    const dx = p.rawDistanceM - meanX;
    sxx += dx * dx;
    sxy += dx * (p.trueDistanceM - meanY);
  }
  if (!(sxx > 0)) return null;
  const scale = sxy / sxx;
  return { scale, offsetM: meanY - scale * meanX };
}

/** Least-squares offset with the scale held: the mean of y − scale·x. */
export function fitOffsetOnly(points: readonly CalibrationPoint[], scale: number): Calibration | null {
  if (points.length < 1 || !finitePoints(points) || !(scale > 0)) return null;
  return { scale, offsetM: points.reduce((s, p) => s + (p.trueDistanceM - scale * p.rawDistanceM), 0) / points.length };
}

/**
 * The calibration a set of dips supports: offset and scale from two or more dips spread over at least
 * MIN_SPREAD_FOR_SCALE_M of raw distance; otherwise the offset alone with the current scale kept.
 */
export function fitCalibration(points: readonly CalibrationPoint[], currentScale: number, minSpreadM = MIN_SPREAD_FOR_SCALE_M): FitResult {
  if (points.length < 2) return { ok: false, reason: "Choose at least two dips that have a sensor reading near their time." };
  if (!finitePoints(points)) return { ok: false, reason: "Every dip needs a finite level and a sensor distance at its time." };
  // The scale's lever is how far apart the sensor saw the dipped levels; the dips' own spread is told
  // beside it, since the two differ when a dip or its time is wrong.
  const sensorSpread = range(points.map((p) => p.rawDistanceM));
  const dipSpread = range(points.map((p) => p.trueDistanceM));
  let calibration: Calibration | null;
  let mode: FitMode;
  let note: string | null = null;
  if (sensorSpread >= minSpreadM) {
    calibration = fitOffsetAndScale(points);
    mode = "offset_and_scale";
  } else {
    calibration = fitOffsetOnly(points, currentScale);
    mode = "offset_only";
    note = `Only the offset is fitted and the scale is kept: the sensor's readings at the dips lie within ${mm(sensorSpread)} of each other, too close to fit a scale. Dip again at a level at least ${(minSpreadM * 100).toFixed(0)} cm away to fit the scale.`;
  }
  if (!calibration) return { ok: false, reason: "The dips do not determine a calibration." };
  if (calibration.scale < SCALE_BOUNDS.min || calibration.scale > SCALE_BOUNDS.max) {
    return {
      ok: false,
      reason: `The fitted scale ${calibration.scale.toFixed(4)} lies outside ${SCALE_BOUNDS.min}–${SCALE_BOUNDS.max}; a dip is probably wrong (check its level and time) rather than the sensor.`,
    };
  }
  const residualsM = residualsUnder(points, calibration);
  return { ok: true, fit: { ...calibration, mode, n: points.length, residualsM, rmsM: rms(residualsM), note, dipSpreadM: dipSpread, sensorSpreadM: sensorSpread } };
}
