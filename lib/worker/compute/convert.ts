// Convert stage: a stored reading and its channel's configuration → time of flight, air temperature,
// speed of sound and a calibrated distance, with a status. Never throws: whatever cannot be
// converted comes back with a status that says why (invalid_config, invalid_value, no_echo, …).
//
// Distances: raw = c·t/2 for timed profiles (or the coded distance); calibrated = scale·raw + offset;
// distance = calibrated − face_offset_m, where face_offset_m is how far the point the sensor times
// from lies behind its face (a horn, a recess), so distances count from the face that an asset's
// mount_height_m refers to.

import { speedOfSoundFor } from "../../physics/speed-of-sound";
import {
  applyCalibration,
  captureToMicroseconds,
  distanceFromEcho,
  dutyCodedDistance,
  pulseCodedDistance,
  summariseBurst,
  type TofErrorReason,
  type TofResult,
} from "../../physics/time-of-flight";
import { distanceStandardUncertainty } from "../../uncertainty/budget";
import { resolveAirTemperature, type TemperatureSeries } from "./air-temperature";
import { PIPELINE_SETTINGS } from "./settings";
import type { ChannelConfig, Measurement, MeasurementStatus, ReadingRow } from "./types";

export interface ConvertInput {
  reading: ReadingRow;
  /** Null when the device has no channel with the reading's index (or the device is gone). */
  channel: ChannelConfig | null;
  /** The channel's site's temperature samples, when it has any. */
  siteSeries: TemperatureSeries | null;
}

/** A fresh record with nothing derived yet; every record has this one shape. */
export function blankMeasurement(reading: ReadingRow, channel: ChannelConfig | null): Measurement {
  return {
    reading,
    channel,
    status: "ok",
    statusDetail: null,
    tofUs: null,
    burstN: null,
    spreadUs: null,
    airTempC: null,
    tempSource: null,
    speedOfSoundMs: null,
    soundModel: null,
    rawDistanceM: null,
    distanceM: null,
    uncertaintyM: null,
    rawValue: null,
    levelM: null,
    volumeL: null,
    fillPct: null,
    ullageL: null,
    occupied: null,
  };
}

// Reasons that blame the device's or channel's settings rather than the value it sent.
const CONFIG_REASONS: ReadonlySet<TofErrorReason> = new Set(["invalid_timer", "non_positive_scale"]);

function fail(m: Measurement, status: MeasurementStatus, detail: string): Measurement {
  m.status = status;
  m.statusDetail = detail;
  return m;
}

function failFrom(m: Measurement, result: { ok: false; reason: TofErrorReason; detail: string }): Measurement {
  return fail(m, CONFIG_REASONS.has(result.reason) ? "invalid_config" : "invalid_value", result.detail);
}

interface TimeOfFlight {
  tofUs: number;
  tickUs: number | null;
  burstN: number | null;
  spreadUs: number | null;
}

type TofOutcome = TofResult<TimeOfFlight> | { ok: false; status: MeasurementStatus; detail: string };

/** Round-trip time from a burst, an echo time or a timer capture, by what the reading carries. */
function timeOfFlight(reading: ReadingRow, channel: ChannelConfig): TofOutcome {
  const d = channel.device;
  const tickUs = d.profile === "capture" && d.clockHz && d.prescaler ? (d.prescaler * 1e6) / d.clockHz : null;
  if (reading.samplesUs !== null && reading.samplesUs.length > 0) {
    const burst = summariseBurst(reading.samplesUs);
    if (!burst.ok) return burst;
    return { ok: true, value: { tofUs: burst.value.medianUs, tickUs, burstN: burst.value.n, spreadUs: burst.value.spreadUs } };
  }
  if (d.profile === "capture" && reading.ticks !== null) {
    if (d.clockHz === null || d.prescaler === null || d.timerBits === null) {
      return { ok: false, status: "invalid_config", detail: "the capture device has no clock_hz, prescaler or timer_bits" };
    }
    const t = captureToMicroseconds({ ticks: reading.ticks, overflows: reading.overflows ?? 0, clockHz: d.clockHz, prescaler: d.prescaler, timerBits: d.timerBits });
    if (!t.ok) return t;
    return { ok: true, value: { tofUs: t.value, tickUs, burstN: null, spreadUs: null } };
  }
  if (reading.echoUs !== null) return { ok: true, value: { tofUs: reading.echoUs, tickUs, burstN: null, spreadUs: null } };
  const wanted = d.profile === "capture" ? "ticks (and overflows), echo_us or samples_us" : "echo_us or samples_us";
  return { ok: false, status: "invalid_value", detail: `a ${d.profile} reading needs ${wanted}` };
}

/** Sets distance_m from the raw distance through calibration and face offset; false when that fails. */
function applyChannelCorrections(m: Measurement, channel: ChannelConfig, rawDistanceM: number): boolean {
  m.rawDistanceM = rawDistanceM;
  const corrected = applyCalibration(rawDistanceM, { offsetM: channel.calibrationOffsetM, scale: channel.calibrationScale });
  if (!corrected.ok) {
    failFrom(m, corrected);
    return false;
  }
  m.distanceM = corrected.value - channel.faceOffsetM;
  return true;
}

function checkRange(m: Measurement, channel: ChannelConfig): boolean {
  const d = m.distanceM as number;
  if (d > channel.maxRangeM) {
    fail(m, "no_echo", `distance ${d.toFixed(3)} m is beyond the channel's ${channel.maxRangeM} m range`);
    return false;
  }
  if (d < channel.minRangeM) {
    fail(m, "too_close", `distance ${d.toFixed(3)} m is inside the ${channel.minRangeM} m blanking distance`);
    return false;
  }
  return true;
}

function convertTimed(m: Measurement, reading: ReadingRow, channel: ChannelConfig, siteSeries: TemperatureSeries | null): Measurement {
  const tof = timeOfFlight(reading, channel);
  if (!tof.ok) return "status" in tof ? fail(m, tof.status, tof.detail) : failFrom(m, tof);
  const { tofUs, tickUs, burstN, spreadUs } = tof.value;
  m.tofUs = tofUs;
  m.rawValue = tofUs;
  m.burstN = burstN;
  m.spreadUs = spreadUs;
  if (!Number.isFinite(tofUs) || tofUs < 0) return fail(m, "invalid_value", `time of flight ${tofUs} µs is not a positive number`);
  if (tofUs === 0) return fail(m, "no_echo", "the sensor reported no echo (0 µs)");
  if (tofUs >= PIPELINE_SETTINGS.noEchoTofUs) return fail(m, "no_echo", `echo of ${tofUs} µs is a timeout`);

  const temp = resolveAirTemperature({ readingTempC: reading.airTempC, atMs: reading.at.getTime(), siteSeries, siteFixedC: channel.site.airTempC });
  const sound = speedOfSoundFor({ tempC: temp.tempC, humidityPct: channel.site.humidityPct });
  m.airTempC = temp.tempC;
  m.tempSource = temp.source;
  m.speedOfSoundMs = sound.speedMs;
  m.soundModel = sound.model;
  m.statusDetail = temp.note;
  const raw = distanceFromEcho(tofUs, sound.speedMs);
  if (!raw.ok) return failFrom(m, raw);
  if (!applyChannelCorrections(m, channel, raw.value)) return m;

  const metresPerUs = (sound.speedMs * 1e-6) / 2;
  m.uncertaintyM = distanceStandardUncertainty({
    rawDistanceM: raw.value,
    speedMs: sound.speedMs,
    tempC: temp.tempC,
    tempUncertaintyK: temp.uncertaintyK,
    tickUs,
    burstSpreadUs: spreadUs,
    burstN,
    statedAccuracyM: channel.statedAccuracyM,
    calibrationRmsM: channel.calibrationRmsM,
    calibrationScale: channel.calibrationScale,
  });
  if (!checkRange(m, channel)) return m;
  if (spreadUs !== null && burstN !== null && burstN >= 3 && spreadUs * metresPerUs > PIPELINE_SETTINGS.noisyBurstSpreadM) {
    return fail(m, "noisy", `burst spread ${(spreadUs * metresPerUs * 1000).toFixed(1)} mm (MAD of ${burstN} pings)`);
  }
  return m;
}

function convertCoded(m: Measurement, reading: ReadingRow, channel: ChannelConfig): Measurement {
  const d = channel.device;
  let raw: TofResult<number>;
  if (d.profile === "pulse_coded") {
    if (d.usPerMm === null) return fail(m, "invalid_config", "the pulse-coded device has no us_per_mm");
    if (reading.pulseUs === null) return fail(m, "invalid_value", "a pulse_coded reading needs pulse_us");
    m.rawValue = reading.pulseUs;
    raw = pulseCodedDistance(reading.pulseUs, d.usPerMm);
  } else {
    if (d.zeroM === null || d.spanM === null) return fail(m, "invalid_config", "the duty-coded device has no zero_m or span_m");
    if (reading.highUs === null || reading.periodUs === null) return fail(m, "invalid_value", "a duty_coded reading needs high_us and period_us");
    const duty = dutyCodedDistance({ highUs: reading.highUs, periodUs: reading.periodUs, zeroM: d.zeroM, spanM: d.spanM });
    if (!duty.ok) return failFrom(m, duty);
    m.rawValue = duty.value.duty;
    raw = { ok: true, value: duty.value.distanceM };
  }
  if (!raw.ok) return failFrom(m, raw);
  if (applyChannelCorrections(m, channel, raw.value)) checkRange(m, channel);
  return m;
}

export function convertReading({ reading, channel, siteSeries }: ConvertInput): Measurement {
  const m = blankMeasurement(reading, channel);
  if (channel === null) return fail(m, "invalid_config", `the device has no channel ${reading.channel}`);
  switch (channel.device.profile) {
    case "echo":
    case "capture":
      return convertTimed(m, reading, channel, siteSeries);
    case "pulse_coded":
    case "duty_coded":
      return convertCoded(m, reading, channel);
    default:
      return fail(m, "invalid_config", `unknown signal profile ${String(channel.device.profile)}`);
  }
}
