// What a device sends for a one-way distance: the inverse of the product's decoding, rounded to what a
// field unit can resolve. Arithmetic as in REFERENCES.md (shared) §2.

/** Round-trip echo time, µs, for a one-way distance (m) at a speed of sound (m/s): t = 2d/c. */
export function echoMicroseconds(distanceM: number, speedMs: number): number {
  return ((2 * distanceM) / speedMs) * 1e6;
}

/** Echo-timing units report to half a microsecond. */
export function roundEchoUs(echoUs: number): number {
  return Math.round(echoUs * 2) / 2;
}

export interface CaptureTimer {
  clockHz: number;
  prescaler: number;
  timerBits: number;
}

/** Timer counts for an echo time: whole ticks of prescaler/f, split into overflows of 2^bits and the remainder. */
export function encodeCapture(echoUs: number, { clockHz, prescaler, timerBits }: CaptureTimer): { ticks: number; overflows: number } {
  const total = Math.round((echoUs * 1e-6 * clockHz) / prescaler);
  const wrap = 2 ** timerBits;
  return { ticks: total % wrap, overflows: Math.floor(total / wrap) };
}

/** A self-compensating sensor's pulse: one-way millimetres times a fixed scale (µs per mm), to 0.1 µs. */
export function encodePulse(distanceM: number, usPerMm: number): { pulse_us: number } {
  return { pulse_us: Math.round(distanceM * 1000 * usPerMm * 10) / 10 };
}

export interface DutyScale {
  zeroM: number;
  spanM: number;
  periodUs: number;
}

// The output never sits exactly at 0 % or 100 %: a line that does not toggle reads as a fault.
const MIN_DUTY = 0.001;
const MAX_DUTY = 0.999;

/** A duty-cycle output: duty = (d − zero)/span, sent as the high time within the period, to 0.1 µs. */
export function encodeDuty(distanceM: number, { zeroM, spanM, periodUs }: DutyScale): { high_us: number; period_us: number } {
  const duty = Math.min(MAX_DUTY, Math.max(MIN_DUTY, (distanceM - zeroM) / spanM));
  return { high_us: Math.round(duty * periodUs * 10) / 10, period_us: periodUs };
}

/** No echo: the module gives up and holds its output high for about 38 ms (common practice). */
export const NO_ECHO_US = 38_000;
