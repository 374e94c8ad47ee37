// Recompute requests: after a channel's calibration, an asset's geometry or mounting, or a site's
// temperature settings change, the use case files a request in its own transaction, with a job that
// wakes the worker for it (one pending at most); the worker (lib/worker/recompute.ts) rebuilds the
// channel's derived rows in the background. Its cycle drains requests too, should a job be lost.

import type { Transaction } from "sequelize";
import { sqlRows } from "../db/sql";
import { addJob, JOBS } from "./job-queue";

const wakeWorker = (transaction?: Transaction) => addJob(JOBS.drainRecomputeRequests, {}, { transaction, jobKey: JOBS.drainRecomputeRequests });

export interface RecomputeRequestInput {
  channelId?: string | null;
  assetId?: string | null;
  reason: string;
}

/** Files a recompute for a channel, or for every channel of an asset; the worker picks it up. */
export async function requestRecompute({ channelId = null, assetId = null, reason }: RecomputeRequestInput, transaction?: Transaction): Promise<{ id: number }> {
  if (!channelId && !assetId) throw new RangeError("requestRecompute needs a channelId or an assetId");
  const [row] = await sqlRows<{ id: string }>(
    `INSERT INTO recompute_requests (channel_id, asset_id, reason) VALUES ($1, $2, $3) RETURNING id`,
    [channelId, assetId, reason],
    { transaction },
  );
  await wakeWorker(transaction);
  return { id: Number(row.id) };
}

/**
 * Files a recompute for each channel with an asset on the site's devices (their air temperature comes
 * from the site). A new temperature channel goes first: rebuilding it stores its readings as the site's
 * samples before the other channels are rebuilt with them. Returns the requests' ids.
 */
export async function requestSiteRecompute(
  siteId: string,
  { reason, temperatureChannelId = null }: { reason: string; temperatureChannelId?: string | null },
  transaction?: Transaction,
): Promise<number[]> {
  const ids = temperatureChannelId ? [(await requestRecompute({ channelId: temperatureChannelId, reason }, transaction)).id] : [];
  const rows = await sqlRows<{ id: string }>(
    `INSERT INTO recompute_requests (channel_id, reason)
     SELECT c.id, $2 FROM channels c JOIN devices d ON d.id = c.device_id
     WHERE d.site_id = $1 AND c.asset_id IS NOT NULL AND c.id IS DISTINCT FROM $3::uuid
     ORDER BY c.id
     RETURNING id`,
    [siteId, reason, temperatureChannelId],
    { transaction },
  );
  if (rows.length > 0) await wakeWorker(transaction);
  return [...ids, ...rows.map((r) => Number(r.id))];
}
