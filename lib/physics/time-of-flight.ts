// Turning what a sensor reports (echo times, timer captures, coded pulses) into a distance.
// Every function returns a result instead of throwing, so the worker can map a failure onto a
// measurement status. Arithmetic: REFERENCES.md (shared) §2.

export type TofErrorReason =
  | "not_finite"
  | "negative_time"
  | "non_positive_speed"
  | "invalid_timer"
  | "tick_out_of_range"
  | "invalid_overflows"
  | "non_positive_scale"
  | "non_positive_period"
  | "duty_out_of_range"
  | "empty_burst";

export type TofResult<T> = { ok: true; value: T } | { ok: false; reason: TofErrorReason; detail: string };

function ok<T>(value: T): TofResult<T> {
  return { ok: true, value };
}

function fail<T>(reason: TofErrorReason, detail: string): TofResult<T> {
  return { ok: false, reason, detail };
}

function firstNonFinite(values: Record<string, number>): string | null {
  for (const name in values) {
    if (!Number.isFinite(values[name])) return name;
  }
  return null;
}

const MAX_TIMER_BITS = 32;

function timerBitsError<T>(timerBits: number): TofResult<T> | null {
  if (!Number.isInteger(timerBits) || timerBits < 1 || timerBits > MAX_TIMER_BITS) {
    return fail("invalid_timer", `timerBits must be an integer 1–${MAX_TIMER_BITS}, got ${timerBits}`);
  }
  return null;
}

/** One-way distance (m) for a round-trip echo time (µs) at the given speed of sound (m/s). */
export function distanceFromEcho(echoUs: number, speedMs: number): TofResult<number> {
  const bad = firstNonFinite({ echoUs, speedMs });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  if (echoUs < 0) return fail("negative_time", `echo time ${echoUs} µs is negative`);
  if (speedMs <= 0) return fail("non_positive_speed", `speed of sound ${speedMs} m/s is not positive`);
  return ok((speedMs * echoUs * 1e-6) / 2);
}

export interface TimerSetup {
  clockHz: number;
  prescaler: number;
  timerBits: number;
}

function timerSetupError<T>({ clockHz, prescaler, timerBits }: TimerSetup): TofResult<T> | null {
  const bad = firstNonFinite({ clockHz, prescaler, timerBits });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  if (clockHz <= 0) return fail("invalid_timer", `clockHz ${clockHz} is not positive`);
  if (!Number.isInteger(prescaler) || prescaler < 1) {
    return fail("invalid_timer", `prescaler must be a positive integer, got ${prescaler}`);
  }
  return timerBitsError(timerBits);
}

export interface CaptureInput extends TimerSetup {
  ticks: number;
  overflows: number;
}

/** Elapsed time (µs) of a timer capture: t = (overflows · 2^bits + ticks) · prescaler / f_clock. */
export function captureToMicroseconds({ ticks, overflows, clockHz, prescaler, timerBits }: CaptureInput): TofResult<number> {
  const setupError = timerSetupError<number>({ clockHz, prescaler, timerBits });
  if (setupError) return setupError;
  const bad = firstNonFinite({ ticks, overflows });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  const wrap = 2 ** timerBits;
  if (!Number.isInteger(ticks) || ticks < 0 || ticks >= wrap) {
    return fail("tick_out_of_range", `ticks must be an integer 0–${wrap - 1}, got ${ticks}`);
  }
  if (!Number.isInteger(overflows) || overflows < 0) {
    return fail("invalid_overflows", `overflows must be a non-negative integer, got ${overflows}`);
  }
  return ok(((overflows * wrap + ticks) * prescaler * 1e6) / clockHz);
}

/**
 * Ticks between two captures of a free-running timer, modulo 2^bits, so a single wrap between
 * start and end still gives the right answer (more than one wrap cannot be seen from two captures).
 */
export function captureDifference(start: number, end: number, timerBits: number): TofResult<number> {
  const bitsError = timerBitsError<number>(timerBits);
  if (bitsError) return bitsError;
  const wrap = 2 ** timerBits;
  for (const [name, value] of [["start", start], ["end", end]] as const) {
    if (!Number.isInteger(value) || value < 0 || value >= wrap) {
      return fail("tick_out_of_range", `${name} must be an integer 0–${wrap - 1}, got ${value}`);
    }
  }
  return ok((((end - start) % wrap) + wrap) % wrap);
}

export interface CaptureResolution {
  /** Duration of one timer tick, µs. */
  tickUs: number;
  /** One-way range one tick of echo time represents, mm. */
  mmPerTick: number;
  /** Time until the counter wraps, µs. */
  wrapUs: number;
  /** One-way range of an echo lasting exactly one wrap, m. */
  wrapRangeM: number;
}

/** Resolution and unambiguous span of a capture timer at a given speed of sound. */
export function captureResolution({ clockHz, prescaler, timerBits, speedMs }: TimerSetup & { speedMs: number }): TofResult<CaptureResolution> {
  const setupError = timerSetupError<CaptureResolution>({ clockHz, prescaler, timerBits });
  if (setupError) return setupError;
  if (!Number.isFinite(speedMs)) return fail("not_finite", "speedMs is not a finite number");
  if (speedMs <= 0) return fail("non_positive_speed", `speed of sound ${speedMs} m/s is not positive`);
  const tickUs = (prescaler * 1e6) / clockHz;
  const wrapUs = tickUs * 2 ** timerBits;
  const metresPerUs = (speedMs * 1e-6) / 2;
  return ok({ tickUs, mmPerTick: tickUs * metresPerUs * 1000, wrapUs, wrapRangeM: wrapUs * metresPerUs });
}

/** Distance (m) from a sensor that reports it as a pulse of `usPerMm` microseconds per millimetre. */
export function pulseCodedDistance(pulseUs: number, usPerMm: number): TofResult<number> {
  const bad = firstNonFinite({ pulseUs, usPerMm });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  if (pulseUs < 0) return fail("negative_time", `pulse ${pulseUs} µs is negative`);
  if (usPerMm <= 0) return fail("non_positive_scale", `usPerMm ${usPerMm} is not positive`);
  return ok(pulseUs / usPerMm / 1000);
}

export interface DutyCodedInput {
  highUs: number;
  periodUs: number;
  /** Distance at 0 % duty, m. */
  zeroM: number;
  /** Distance added between 0 % and 100 % duty, m. */
  spanM: number;
}

export interface DutyCodedDistance {
  duty: number;
  lowUs: number;
  distanceM: number;
}

/**
 * Distance (m) from a duty-cycle-coded output: zero + duty · span. A high time of zero or of a
 * whole period means the line never toggled (stuck low or high), so it is refused.
 */
export function dutyCodedDistance({ highUs, periodUs, zeroM, spanM }: DutyCodedInput): TofResult<DutyCodedDistance> {
  const bad = firstNonFinite({ highUs, periodUs, zeroM, spanM });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  if (periodUs <= 0) return fail("non_positive_period", `period ${periodUs} µs is not positive`);
  if (highUs <= 0 || highUs >= periodUs) {
    return fail("duty_out_of_range", `high time ${highUs} µs must be above 0 and below the period ${periodUs} µs`);
  }
  const duty = highUs / periodUs;
  return ok({ duty, lowUs: periodUs - highUs, distanceM: zeroM + duty * spanM });
}

export interface BurstSummary {
  medianUs: number;
  /** Median absolute deviation from the median (unscaled, not multiplied by 1.4826), µs. */
  spreadUs: number;
  n: number;
}

function medianOfSorted(sorted: readonly number[]): number {
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/**
 * Robust centre and spread of a burst of echo times: the median, and the median absolute
 * deviation (MAD) as the spread, so one stray echo moves neither.
 */
export function summariseBurst(samplesUs: readonly number[]): TofResult<BurstSummary> {
  if (samplesUs.length === 0) return fail("empty_burst", "no samples in the burst");
  if (samplesUs.some((s) => !Number.isFinite(s))) return fail("not_finite", "a sample is not a finite number");
  if (samplesUs.some((s) => s < 0)) return fail("negative_time", "a sample is negative");
  const sorted = [...samplesUs].sort((a, b) => a - b);
  const medianUs = medianOfSorted(sorted);
  const deviations = sorted.map((s) => Math.abs(s - medianUs)).sort((a, b) => a - b);
  return ok({ medianUs, spreadUs: medianOfSorted(deviations), n: sorted.length });
}

export interface Calibration {
  offsetM: number;
  scale: number;
}

/** Corrected distance = scale · raw + offset (scale first, so the offset is in corrected metres). */
export function applyCalibration(distanceM: number, { offsetM, scale }: Calibration): TofResult<number> {
  const bad = firstNonFinite({ distanceM, offsetM, scale });
  if (bad) return fail("not_finite", `${bad} is not a finite number`);
  if (scale <= 0) return fail("non_positive_scale", `calibration scale ${scale} is not positive`);
  return ok(scale * distanceM + offsetM);
}
