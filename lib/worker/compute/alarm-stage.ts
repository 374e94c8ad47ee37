// Alarm stage, pure part: what a processed batch gives the alarm engine — each tank's usable levels
// and the channels whose health flags may have changed. The database side (loading the alarms,
// running lib/alarms/engine, writing state and events) is lib/worker/alarm-evaluation.ts.

import type { ProcessedBatch } from "./batch";
import type { MeasurementStatus } from "./types";

/** Statuses whose level is a value of the tank (as derive.ts uses the distance). */
const USABLE: readonly MeasurementStatus[] = ["ok", "noisy"];

export interface AlarmStageInput {
  levels: { assetId: string; channelId: string; at: Date; levelM: number }[];
  /** Channels measured in the batch or named by its flag changes. */
  channelIds: string[];
}

export function alarmStageInput(batch: Pick<ProcessedBatch, "measurements" | "flags" | "offlineCleared">): AlarmStageInput {
  const levels: AlarmStageInput["levels"] = [];
  const channels = new Set<string>();
  for (const m of batch.measurements) {
    if (!m.channel) continue;
    channels.add(m.channel.id);
    const asset = m.channel.asset;
    if (asset?.kind !== "tank" || m.levelM === null || !Number.isFinite(m.levelM) || !USABLE.includes(m.status)) continue;
    levels.push({ assetId: asset.id, channelId: m.channel.id, at: m.reading.at, levelM: m.levelM });
  }
  for (const f of [...batch.flags.opens, ...batch.flags.clears, ...batch.flags.intervals, ...batch.offlineCleared]) channels.add(f.channelId);
  return { levels, channelIds: [...channels] };
}
