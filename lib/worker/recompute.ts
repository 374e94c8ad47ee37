// Recompute: after a channel's calibration or an asset's geometry or mounting changes, the worker
// rebuilds that channel's measurements, rollups, bay sessions and health flags from its readings.
// Use cases only file a request (lib/services/recompute-requests.ts); the worker drains them here. A
// channel is rebuilt in one transaction from a fresh state, so doing it twice gives the same rows.

import { getSequelize } from "../db/sequelize";
import { processBatch } from "./compute/batch";
import { initialChannelState, type ChannelState } from "./compute/channel-state";
import { exactMicros, loadChannel, resetLatestValue, loadTemperatureChannelSites, loadTemperatureSamples, lockChannelStates, fetchReadings, MICROS_TO_TIMESTAMPTZ, readingsAsArrays } from "./batch-store";
import { writeProcessedBatch } from "./encode";
import { sqlRows, sqlRun } from "../db/sql";

const REPLAY_CHUNK = 5000;

/** Rebuilds one channel's derived rows from its readings; returns the measurements written. */
export async function recomputeChannel(channelId: string): Promise<number> {
  return getSequelize().transaction(async (transaction) => {
    const channel = await loadChannel(channelId, transaction);
    if (!channel) return 0;
    await lockChannelStates([channelId], transaction);
    const assetId = channel.asset?.id ?? null;
    const d = channel.device.id;

    // Measurements taken while the channel served another asset stay as they were.
    await sqlRun(`DELETE FROM measurements WHERE channel_id = $1 AND asset_id IS NOT DISTINCT FROM $2`, [channelId, assetId], { transaction });
    await resetLatestValue(channelId, transaction);
    if (assetId) {
      await sqlRun(`DELETE FROM measurement_rollups WHERE channel_id = $1 AND asset_id = $2`, [channelId, assetId], { transaction });
      await sqlRun(`DELETE FROM occupancy_sessions WHERE channel_id = $1 AND asset_id = $2`, [channelId, assetId], { transaction });
      await sqlRun(`UPDATE manual_dips SET evaluated_at = NULL, measured_level_m = NULL, residual_m = NULL, channel_id = NULL WHERE asset_id = $1`, [assetId], { transaction });
      await sqlRun(`DELETE FROM tank_forecasts WHERE asset_id = $1`, [assetId], { transaction });
    }
    // Crosstalk depends on timing only, and the open offline flag on the present silence: both stay.
    await sqlRun(
      `DELETE FROM health_flags WHERE channel_id = $1 AND flag <> 'crosstalk_risk' AND NOT (flag = 'offline' AND cleared_at IS NULL)`,
      [channelId],
      { transaction },
    );
    const crosstalk = await sqlRows<{ since: Date }>(
      `SELECT since FROM health_flags WHERE channel_id = $1 AND flag = 'crosstalk_risk' AND cleared_at IS NULL`,
      [channelId],
      { transaction },
    );
    let state: ChannelState = { ...initialChannelState(), open: crosstalk.length ? { crosstalk_risk: { sinceMs: crosstalk[0].since.getTime() } } : {} };
    await sqlRun(`UPDATE channel_state SET state = $2::jsonb, last_at = NULL, last_reading_id = NULL, version = version + 1 WHERE channel_id = $1`, [channelId, JSON.stringify(state)], { transaction });

    const temperatureChannelSites = await loadTemperatureChannelSites([channelId], transaction);
    // Keyset paging from before any plausible reading (1900-01-01).
    let after = { micros: -2_208_988_800_000_000, id: 0 };
    let written = 0;
    for (;;) {
      // Readings still queued are left to the queue, which measures them after this.
      const { readings, subMillis } = await fetchReadings(
        readingsAsArrays(`(SELECT * FROM readings x
           WHERE x.device_id = $1 AND x.channel = $2 AND (x.at, x.id) > (${MICROS_TO_TIMESTAMPTZ("$3")}, $4::bigint)
             AND NOT EXISTS (SELECT 1 FROM measurements m WHERE m.reading_id = x.id AND m.at = x.at)
             AND NOT EXISTS (SELECT 1 FROM reading_queue q WHERE q.reading_id = x.id)
           ORDER BY x.at, x.id LIMIT $5) r`),
        [d, channel.index, after.micros, after.id, REPLAY_CHUNK],
        transaction,
      );
      if (readings.length === 0) break;
      const temperatureSamples = await loadTemperatureSamples([channel.site.id], readings[0].at, readings[readings.length - 1].at, transaction);
      const batch = processBatch({ readings, channels: [channel], states: new Map([[channelId, { state, offlineSince: null }]]), temperatureSamples, temperatureChannelSites });
      written += (await writeProcessedBatch(batch, subMillis, transaction)).inserted;
      state = batch.states.get(channelId) ?? state;
      const last = readings[readings.length - 1];
      after = { micros: exactMicros(last, subMillis), id: last.id };
    }
    return written;
  });
}

export interface RecomputeResult {
  requests: number;
  channels: number;
  measurements: number;
}

/** Works through pending recompute requests, oldest first; several workers share them. */
export async function drainRecomputeRequests(maxRequests = 50): Promise<RecomputeResult> {
  const result: RecomputeResult = { requests: 0, channels: 0, measurements: 0 };
  for (let i = 0; i < maxRequests; i++) {
    const done = await getSequelize().transaction(async (transaction) => {
      const [request] = await sqlRows<{ id: string; channel_id: string | null; asset_id: string | null }>(
        `SELECT id, channel_id, asset_id FROM recompute_requests WHERE done_at IS NULL ORDER BY id LIMIT 1 FOR UPDATE SKIP LOCKED`,
        [],
        { transaction },
      );
      if (!request) return false;
      const startedAt = new Date();
      await sqlRun(`UPDATE recompute_requests SET started_at = $2 WHERE id = $1`, [request.id, startedAt], { transaction });
      const channelIds = request.channel_id
        ? [request.channel_id]
        : (await sqlRows<{ id: string }>(`SELECT id FROM channels WHERE asset_id = $1 ORDER BY id`, [request.asset_id], { transaction })).map((r) => r.id);
      let measurements = 0;
      let error: string | null = null;
      for (const id of channelIds) {
        try {
          measurements += await recomputeChannel(id);
        } catch (err) {
          error = err instanceof Error ? err.message : String(err);
        }
      }
      // Earlier requests for the same target that were waiting are answered by this run too.
      await sqlRun(
        `UPDATE recompute_requests SET done_at = now(), started_at = coalesce(started_at, $2), channels_done = $3, measurements = $4, error = $5
         WHERE id = $1 OR (id IN (SELECT id FROM recompute_requests WHERE done_at IS NULL AND started_at IS NULL AND requested_at <= $2
                              AND channel_id IS NOT DISTINCT FROM $6 AND asset_id IS NOT DISTINCT FROM $7 FOR UPDATE SKIP LOCKED) AND $5::text IS NULL)`,
        [request.id, startedAt, channelIds.length, measurements, error, request.channel_id, request.asset_id],
        { transaction },
      );
      result.requests += 1;
      result.channels += channelIds.length;
      result.measurements += measurements;
      return true;
    });
    if (!done) break;
  }
  return result;
}
