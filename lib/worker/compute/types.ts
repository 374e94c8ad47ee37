// The shapes that flow between the worker's stages: a reading as stored, the configuration of its
// channel, and what each stage adds. Plain data only, so every stage is a pure function.

import type { TankGeometry } from "../../geometry/tank-volume";

export const MEASUREMENT_STATUSES = [
  "ok",
  "too_close",
  "no_echo",
  "noisy",
  "out_of_bounds",
  "suspect",
  "invalid_config",
  "invalid_value",
] as const;
export type MeasurementStatus = (typeof MEASUREMENT_STATUSES)[number];

export const TEMP_SOURCES = ["reading", "site_samples", "site_fixed", "default"] as const;
export type TempSource = (typeof TEMP_SOURCES)[number];


export type SignalProfile = "echo" | "capture" | "pulse_coded" | "duty_coded";
export type AssetKind = "tank" | "bay" | "point";

/** A row of `readings`, as the device sent it. */
export interface ReadingRow {
  id: number;
  deviceId: string;
  channel: number;
  at: Date;
  echoUs: number | null;
  ticks: number | null;
  overflows: number | null;
  samplesUs: number[] | null;
  pulseUs: number | null;
  highUs: number | null;
  periodUs: number | null;
  airTempC: number | null;
}

export interface DeviceConfig {
  id: string;
  siteId: string;
  profile: SignalProfile;
  clockHz: number | null;
  prescaler: number | null;
  timerBits: number | null;
  usPerMm: number | null;
  zeroM: number | null;
  spanM: number | null;
  expectedIntervalS: number;
}

export interface AssetConfig {
  id: string;
  kind: AssetKind;
  mountHeightM: number | null;
  capacityL: number | null;
  geometry: TankGeometry | null;
  floorDistanceM: number | null;
  occupiedBelowM: number | null;
  reorderPct: number | null;
}

export interface SiteConfig {
  id: string;
  airTempC: number | null;
  humidityPct: number | null;
}

/** Everything the worker needs to turn a channel's readings into measurements. */
export interface ChannelConfig {
  id: string;
  index: number;
  minRangeM: number;
  maxRangeM: number;
  faceOffsetM: number;
  calibrationOffsetM: number;
  calibrationScale: number;
  /** Half-width of the transducer's stated accuracy, metres; null: the trade default (lib/uncertainty/budget). */
  statedAccuracyM: number | null;
  /** RMS residual of the calibration fit from dips now in force; null when never calibrated from dips. */
  calibrationRmsM: number | null;
  device: DeviceConfig;
  site: SiteConfig;
  asset: AssetConfig | null;
}

/**
 * One measurement record. The convert stage creates it (time of flight, temperature, distance); the
 * derive stage fills in what the asset makes of it (level, volume, occupancy) and may refine its
 * status. Records belong to the batch being processed, so stages fill them in rather than copy them.
 */
export interface Measurement {
  reading: ReadingRow;
  channel: ChannelConfig | null;
  status: MeasurementStatus;
  statusDetail: string | null;
  tofUs: number | null;
  burstN: number | null;
  spreadUs: number | null;
  airTempC: number | null;
  tempSource: TempSource | null;
  speedOfSoundMs: number | null;
  soundModel: "dry" | "cramer" | null;
  /** Distance the sensor timed, before calibration and face offset. */
  rawDistanceM: number | null;
  /** Distance from the sensor face, after calibration and face offset. */
  distanceM: number | null;
  uncertaintyM: number | null;
  /** The value that should change when the level changes: tof, pulse or duty as sent. */
  rawValue: number | null;
  levelM: number | null;
  volumeL: number | null;
  fillPct: number | null;
  ullageL: number | null;
  occupied: boolean | null;
}
