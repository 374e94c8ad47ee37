// Derive stage: one channel's measurement records (one batch) → what the asset makes of the distance:
// a tank's level, volume, fill and ullage; a bay's occupancy; a point's distance alone. Spikes are
// marked "suspect" by a causal Hampel filter over the channel's recent distances (detrended for tanks,
// whose level moves). Bays skip the filter: a car arriving is a step, not a spike, and the debounce
// already guards against single stray echoes.

import { tankCapacity, tankHeight, volumeAtLevel } from "../../geometry/tank-volume";
import { isHampelSpike } from "../../signal/hampel";
import { trackBayOccupancy, type BayConfig, type BaySession, type BayState } from "../../occupancy/bay";
import { pushInto, roundForState, type ChannelState } from "./channel-state";
import { PIPELINE_SETTINGS } from "./settings";
import type { AssetConfig, ChannelConfig, Measurement } from "./types";

export interface DerivedChannel {
  /** The same records, in time order, filled in. */
  measurements: Measurement[];
  state: ChannelState;
  /** Bay sessions that ended in this batch, and the one still open. */
  sessions: BaySession[];
}

/** Time order, and reading id for readings with the same time. */
export function byTime(a: Measurement, b: Measurement): number {
  return a.reading.at.getTime() - b.reading.at.getTime() || a.reading.id - b.reading.id;
}

/** Statuses whose distance is a usable value of the channel. */
function hasUsableDistance(m: Measurement): boolean {
  return m.distanceM !== null && (m.status === "ok" || m.status === "noisy");
}

function deriveTank(m: Measurement, asset: AssetConfig): void {
  if (!hasUsableDistance(m)) return;
  if (asset.geometry === null || asset.mountHeightM === null) {
    m.status = "invalid_config";
    m.statusDetail = "the tank has no geometry or mount height";
    return;
  }
  const levelM = asset.mountHeightM - (m.distanceM as number);
  const height = tankHeight(asset.geometry);
  const tolerance = Math.max(PIPELINE_SETTINGS.outOfBoundsToleranceM, 3 * (m.uncertaintyM ?? 0));
  m.levelM = levelM;
  if (levelM < -tolerance || levelM > height + tolerance) {
    m.status = "out_of_bounds";
    m.statusDetail = `level ${levelM.toFixed(3)} m is outside the tank (0–${height.toFixed(3)} m)`;
    return;
  }
  const volumeL = volumeAtLevel(asset.geometry, levelM);
  const capacityL = asset.capacityL ?? tankCapacity(asset.geometry);
  m.volumeL = volumeL;
  m.fillPct = capacityL > 0 ? (100 * volumeL) / capacityL : null;
  m.ullageL = capacityL - volumeL;
}

const HAMPEL = { nSigmas: PIPELINE_SETTINGS.hampelSigmas, minSigma: PIPELINE_SETTINGS.hampelMinSigmaM, minWindow: PIPELINE_SETTINGS.hampelMinWindow };
const HAMPEL_DETRENDED = { ...HAMPEL, detrend: true };

function markSpikes(measurements: readonly Measurement[], state: ChannelState, detrend: boolean): number[] {
  const span = 2 * PIPELINE_SETTINGS.hampelHalfWindow;
  const window = state.hampel.slice(-span);
  for (const m of measurements) {
    if (!hasUsableDistance(m)) continue;
    const x = m.distanceM as number;
    if (isHampelSpike(window, x, detrend ? HAMPEL_DETRENDED : HAMPEL) && m.status === "ok") {
      m.status = "suspect";
      m.statusDetail = "spike rejected by the Hampel filter";
    }
    pushInto(window, roundForState(x), span);
  }
  return window;
}

function bayConfig(asset: AssetConfig): BayConfig | null {
  if (asset.occupiedBelowM === null || !(asset.occupiedBelowM > 0)) return null;
  return { occupiedBelowM: asset.occupiedBelowM, hysteresisM: PIPELINE_SETTINGS.bayHysteresisM, debounce: PIPELINE_SETTINGS.bayDebounce };
}

function deriveBay(measurements: readonly Measurement[], asset: AssetConfig, state: BayState): { bay: BayState; sessions: BaySession[] } {
  const config = bayConfig(asset);
  if (config === null) {
    for (const m of measurements) {
      if (!hasUsableDistance(m)) continue;
      m.status = "invalid_config";
      m.statusDetail = "the bay has no occupied_below_m";
    }
    return { bay: state, sessions: [] };
  }
  let bay = state;
  const sessions = new Map<number, BaySession>();
  for (const m of measurements) {
    if (!hasUsableDistance(m)) continue;
    const update = trackBayOccupancy([{ at: m.reading.at, distanceM: m.distanceM }], config, bay);
    bay = update.state;
    for (const s of update.sessions) sessions.set(s.start.getTime(), s);
    m.occupied = bay.occupied;
  }
  return { bay, sessions: [...sessions.values()] };
}

/** Derives one channel's batch: sorts the records by time and fills them in. */
export function deriveChannel(records: Measurement[], channel: ChannelConfig, state: ChannelState): DerivedChannel {
  const measurements = records.sort(byTime);
  const asset = channel.asset;
  if (asset?.kind === "bay") {
    const { bay, sessions } = deriveBay(measurements, asset, state.bay);
    return { measurements, state: { ...state, bay }, sessions };
  }
  if (asset?.kind === "tank") for (const m of measurements) deriveTank(m, asset);
  const hampel = markSpikes(measurements, state, asset?.kind === "tank");
  return { measurements, state: { ...state, hampel }, sessions: [] };
}
