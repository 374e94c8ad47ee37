// The asset trend's data, prepared for the chart: the compensated line, the line an uncompensated
// unit would have drawn (a fixed speed of sound), the uncertainty band, the air temperature and the
// forecast to the reorder date. Pure functions over plain numbers; the chart only draws them.

import { levelForVolume, type TankGeometry } from "@/lib/geometry/tank-volume";
import { speedOfSoundDry } from "@/lib/physics/speed-of-sound";

/** The speed an uncompensated unit assumes: dry air at 20 °C (common practice: a fixed room-temperature speed). */
export const NOMINAL_SPEED_MS = speedOfSoundDry(20);

export interface ChannelCalibration {
  offsetM: number;
  scale: number;
  faceOffsetM: number;
}

/**
 * The distance the unit would report with the nominal speed instead of the speed at the air
 * temperature, under the same calibration: distance = scale · (c·t/2) + offset − face offset, so the
 * timed part is rescaled by c_nominal / c.
 */
export function uncompensatedDistance(distanceM: number, speedMs: number, cal: ChannelCalibration, nominalMs = NOMINAL_SPEED_MS): number {
  if (!(speedMs > 0) || !(cal.scale !== 0)) throw new RangeError("speed and scale must be non-zero");
  const timed = (distanceM + cal.faceOffsetM - cal.offsetM) / cal.scale;
  return cal.scale * timed * (nominalMs / speedMs) + cal.offsetM - cal.faceOffsetM;
}

/** One point of a series, whatever its source (a measurement or a rollup bucket's means). */
export interface SeriesPoint {
  atMs: number;
  /** Compensated distance from the sensor face, m. */
  distanceM: number | null;
  /** Compensated level, m (tanks). */
  levelM: number | null;
  airTempC: number | null;
  /** Speed of sound the worker used; when absent it follows from the air temperature. */
  speedMs: number | null;
  uncertaintyM: number | null;
  /** Temperature compensation applies (a unit that times an echo); false for self-compensating units. */
  compensated: boolean;
}

export type Quantity = "level" | "distance";
type Pair = [number, number | null];

export interface TrendData {
  quantity: Quantity;
  compensated: Pair[];
  raw: Pair[];
  bandLow: Pair[];
  bandWidth: Pair[];
  temperature: Pair[];
}

/** Series for the chart: level for a tank (mount height − distance), distance for bays and points. */
export function buildTrend(points: readonly SeriesPoint[], opts: { quantity: Quantity; mountHeightM: number | null; calibration: ChannelCalibration }): TrendData {
  const out: TrendData = { quantity: opts.quantity, compensated: [], raw: [], bandLow: [], bandWidth: [], temperature: [] };
  const asQuantity = (distance: number) => (opts.quantity === "level" && opts.mountHeightM != null ? opts.mountHeightM - distance : distance);
  for (const p of [...points].sort((a, b) => a.atMs - b.atMs)) {
    const value = opts.quantity === "level" ? (p.levelM ?? (p.distanceM != null && opts.mountHeightM != null ? opts.mountHeightM - p.distanceM : null)) : p.distanceM;
    out.compensated.push([p.atMs, value]);
    const speed = p.speedMs ?? (p.airTempC != null ? speedOfSoundDry(p.airTempC) : null);
    const raw = p.compensated && p.distanceM != null && speed != null ? asQuantity(uncompensatedDistance(p.distanceM, speed, opts.calibration)) : null;
    out.raw.push([p.atMs, raw]);
    const u = value != null && p.uncertaintyM != null ? p.uncertaintyM : null;
    out.bandLow.push([p.atMs, u != null && value != null ? value - u : null]);
    out.bandWidth.push([p.atMs, u != null ? 2 * u : null]);
    out.temperature.push([p.atMs, p.airTempC]);
  }
  return out;
}

/**
 * The forecast as a line from now to the reorder date: the volume falls linearly (the forecast's
 * litres a day), and each step's level follows from the tank's shape.
 */
export function forecastLine(
  f: { geometry: TankGeometry; volumeNowL: number; reorderVolumeL: number; nowMs: number; reorderAtMs: number },
  steps = 12,
): [number, number][] {
  if (!(f.reorderAtMs > f.nowMs)) return [];
  const line: [number, number][] = [];
  for (let i = 0; i <= steps; i++) {
    const share = i / steps;
    const volume = f.volumeNowL + (f.reorderVolumeL - f.volumeNowL) * share;
    line.push([f.nowMs + (f.reorderAtMs - f.nowMs) * share, levelForVolume(f.geometry, volume)]);
  }
  return line;
}

/** Which source a period reads: raw measurements up to a day, 5-minute rollups up to a week, hourly beyond. */
export function sourceForPeriod(fromMs: number, toMs: number): { kind: "raw" } | { kind: "rollup"; bucket: "5m" | "1h" } {
  const days = (toMs - fromMs) / 86_400_000;
  if (days <= 1) return { kind: "raw" };
  return { kind: "rollup", bucket: days <= 7 ? "5m" : "1h" };
}
