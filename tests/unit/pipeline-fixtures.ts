import type { TankGeometry } from "@/lib/geometry/tank-volume";
import type { AssetConfig, ChannelConfig, DeviceConfig, ReadingRow } from "@/lib/worker/compute/types";

// Channel configurations and readings for the pipeline's unit tests. The defaults are an echo device
// at a site with no temperature source, channel range 2 cm – 4 m, no calibration.

export function device(overrides: Partial<DeviceConfig> = {}): DeviceConfig {
  return { id: "device-1", siteId: "site-1", profile: "echo", clockHz: null, prescaler: null, timerBits: null, usPerMm: null, zeroM: null, spanM: null, expectedIntervalS: 60, ...overrides };
}

export function tank(geometry: TankGeometry, mountHeightM: number, overrides: Partial<AssetConfig> = {}): AssetConfig {
  return { id: "tank-1", kind: "tank", mountHeightM, capacityL: null, geometry, floorDistanceM: null, occupiedBelowM: null, reorderPct: null, ...overrides };
}

export function bay(floorDistanceM = 2.5, occupiedBelowM = 1.8): AssetConfig {
  return { id: "bay-1", kind: "bay", mountHeightM: null, capacityL: null, geometry: null, floorDistanceM, occupiedBelowM, reorderPct: null };
}

export function point(floorDistanceM: number | null = null): AssetConfig {
  return { id: "point-1", kind: "point", mountHeightM: null, capacityL: null, geometry: null, floorDistanceM, occupiedBelowM: null, reorderPct: null };
}

export function channel(overrides: Partial<Omit<ChannelConfig, "device">> & { device?: Partial<DeviceConfig> } = {}): ChannelConfig {
  const { device: deviceOverrides, ...rest } = overrides;
  return {
    id: "channel-1",
    index: 0,
    minRangeM: 0.02,
    maxRangeM: 4,
    faceOffsetM: 0,
    calibrationOffsetM: 0,
    calibrationScale: 1,
    statedAccuracyM: null,
    calibrationRmsM: null,
    site: { id: "site-1", airTempC: null, humidityPct: null },
    asset: null,
    ...rest,
    device: device(deviceOverrides),
  };
}

let nextId = 1;
export const T0 = Date.parse("2026-03-14T06:30:00Z");

export function reading(fields: Partial<ReadingRow> = {}): ReadingRow {
  return {
    id: nextId++,
    deviceId: "device-1",
    channel: 0,
    at: new Date(T0),
    echoUs: null,
    ticks: null,
    overflows: null,
    samplesUs: null,
    pulseUs: null,
    highUs: null,
    periodUs: null,
    airTempC: null,
    ...fields,
  };
}

/** Round-trip time (µs) for a one-way distance at speed c (REFERENCES.md §2, d = c·t/2). */
export const echoFor = (distanceM: number, speedMs: number) => (2 * distanceM * 1e6) / speedMs;

/** REFERENCES.md §1 practical formula, written out independently of lib/physics. */
export const practicalSpeed = (tempC: number) => 331.3 * Math.sqrt(1 + tempC / 273.15);

export const M_PER_IN = 0.0254;
export const L_PER_US_GAL = 3.785411784;
