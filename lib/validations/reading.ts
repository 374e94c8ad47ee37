import { z } from "zod";
import type { SignalProfile } from "./device";

// Device API v1: the body's shape and one reading's fields. Device-specific rules (its channels, its
// profile, its timer width) are checked by `checkReadingForDevice`.
export const MAX_READINGS_PER_REQUEST = 500;
export const MAX_BODY_BYTES = 256 * 1024;
export const MAX_FUTURE_MS = 5 * 60 * 1000;
const EARLIEST_AT = Date.UTC(2000, 0, 1);
// An echo longer than a second is no echo at all; a no-echo timeout is reported as about 38 ms (common practice).
const MAX_TIME_US = 1_000_000;

const time = (what: string) =>
  z.number({ message: `${what} must be a number of microseconds.` }).positive(`${what} must be above 0 µs.`).max(MAX_TIME_US, `${what} must be at most 1 s (1 000 000 µs).`);

export const readingSchema = z
  .object({
    seq: z.number({ message: "seq must be a whole number." }).int("seq must be a whole number.").min(0, "seq must be 0 or more.").max(Number.MAX_SAFE_INTEGER),
    channel: z.number({ message: "channel must be a whole number 0–7." }).int("channel must be a whole number 0–7.").min(0, "channel must be 0–7.").max(7, "channel must be 0–7."),
    at: z.iso
      .datetime({ offset: true, message: "at must be an ISO 8601 date-time with a time zone, like 2026-03-14T06:30:00Z." })
      .optional(),
    echo_us: time("echo_us").optional(),
    ticks: z.number({ message: "ticks must be a whole number." }).int("ticks must be a whole number.").min(0, "ticks must be 0 or more.").max(2 ** 32 - 1).optional(),
    overflows: z.number({ message: "overflows must be a whole number." }).int("overflows must be a whole number.").min(0, "overflows must be 0 or more.").max(100000).optional(),
    samples_us: z.array(time("each of samples_us"), { message: "samples_us must be an array of numbers." }).min(1, "samples_us needs at least one sample.").max(32, "samples_us holds at most 32 samples.").optional(),
    pulse_us: time("pulse_us").optional(),
    high_us: z.number({ message: "high_us must be a number." }).min(0, "high_us must be 0 or more.").max(MAX_TIME_US).optional(),
    period_us: time("period_us").optional(),
    air_temp_c: z.number({ message: "air_temp_c must be a number." }).min(-60, "air_temp_c must be between -60 and 90 °C.").max(90, "air_temp_c must be between -60 and 90 °C.").optional(),
    battery_v: z.number({ message: "battery_v must be a number." }).min(0, "battery_v must be 0–60 V.").max(60, "battery_v must be 0–60 V.").optional(),
    rssi_dbm: z.number({ message: "rssi_dbm must be a number." }).min(-200, "rssi_dbm must be between -200 and 0 dBm.").max(0, "rssi_dbm must be between -200 and 0 dBm.").optional(),
  })
  .strict();

export type ReadingInput = z.infer<typeof readingSchema>;

export const batchSchema = z
  .object({
    readings: z.array(z.unknown(), { message: "readings must be an array." }).min(1, "readings must hold at least one reading.").max(MAX_READINGS_PER_REQUEST, `readings holds at most ${MAX_READINGS_PER_REQUEST} a request.`),
  })
  .strict();

type SignalKind = "echo" | "capture" | "burst" | "pulse" | "duty";

export function signalKind(r: ReadingInput): SignalKind | { error: string } {
  const present: SignalKind[] = [];
  if (r.echo_us !== undefined) present.push("echo");
  if (r.ticks !== undefined) present.push("capture");
  if (r.samples_us !== undefined) present.push("burst");
  if (r.pulse_us !== undefined) present.push("pulse");
  if (r.high_us !== undefined || r.period_us !== undefined) present.push("duty");
  if (present.length === 0) return { error: "Send one signal: echo_us, ticks, samples_us, pulse_us, or high_us with period_us." };
  if (present.length > 1) return { error: "Send only one signal per reading (echo_us, ticks, samples_us, pulse_us or high_us with period_us)." };
  if (r.overflows !== undefined && present[0] !== "capture") return { error: "overflows goes with ticks only." };
  if (present[0] === "duty") {
    if (r.high_us === undefined || r.period_us === undefined) return { error: "A duty-coded reading needs both high_us and period_us." };
    if (r.high_us >= r.period_us) return { error: "high_us must be less than period_us." };
  }
  return present[0];
}

const ALLOWED: Record<SignalProfile, SignalKind[]> = {
  echo: ["echo", "burst"],
  capture: ["capture"],
  pulse_coded: ["pulse", "burst"],
  duty_coded: ["duty"],
};

export interface DeviceRules {
  profile: SignalProfile;
  timerBits: number | null;
  channels: number[];
}

/** The rules a reading must meet for this device beyond its shape; returns a message or null. */
export function checkReadingForDevice(r: ReadingInput, device: DeviceRules, now: number): string | null {
  if (!device.channels.includes(r.channel)) return `channel ${r.channel} is not configured on this device (it has ${device.channels.join(", ") || "none"}).`;
  const kind = signalKind(r);
  if (typeof kind !== "string") return kind.error;
  if (!ALLOWED[device.profile].includes(kind)) return `This device uses the ${device.profile} profile; send ${ALLOWED[device.profile].map(fieldOf).join(" or ")}.`;
  if (kind === "capture" && device.timerBits && r.ticks! >= 2 ** device.timerBits) return `ticks must be below 2^${device.timerBits} for this device's ${device.timerBits}-bit timer.`;
  if (r.at !== undefined) {
    const t = Date.parse(r.at);
    if (!Number.isFinite(t) || t < EARLIEST_AT) return "at must be a real date-time after 2000-01-01.";
    if (t > now + MAX_FUTURE_MS) return "at lies more than 5 minutes in the future; check the device clock.";
  }
  return null;
}

function fieldOf(kind: SignalKind): string {
  return { echo: "echo_us", capture: "ticks (+ overflows)", burst: "samples_us", pulse: "pulse_us", duty: "high_us with period_us" }[kind];
}
