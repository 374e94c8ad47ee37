// Lanes: the reading queue split by device into LANE_COUNT lanes, so that several workers drain it
// side by side on disjoint sets of channels. Without them every batch (the oldest readings of the
// whole queue) touched nearly every channel, and a second worker waited on the first's state rows
// batch after batch.
//
// Two kinds of advisory lock, both in the two-key form (namespace, lane):
// - OWNED: a draining worker holds its lanes on a connection of its own for the whole drain, plus one
//   shared "present" lock, so each worker can count the others and keep its fair share of lanes
//   (rebalance, before every claim). Ownership only says where a worker claims; it is not what keeps
//   a channel's readings in order, so handing a lane over is safe at any moment.
// - CLAIMING: a claim holds the claim lock of each lane it claims from until its batch has queued for
//   its channels' state rows (batch.ts). That is what orders batches: every channel lies in exactly one
//   lane, so two batches with readings of one channel were claimed one after the other under that
//   lane's lock and queue for the channel's state row in that order, whichever workers claimed them.

import type { SessionSql } from "../db/sql";

export const LANE_COUNT = 16;

/** Namespaces (the first key) of the lane locks; each fits an int4. */
const OWNED = 0x48544c4f;
export const CLAIMING = 0x48544c43;
/** Second key of the shared lock every draining worker holds in the OWNED namespace. */
const PRESENT = LANE_COUNT;

/** SQL for the lane of a device id column. */
export const laneOfDevice = (column: string) => `(uuid_hash(${column}) & ${LANE_COUNT - 1})`;

/** How many waiting readings (the next in the queue's physical order) are counted to weigh lanes when giving some up. */
const WEIGH_READINGS = 100_000;

/** How long a worker that owns no lane waits for another to give some up, and how often it asks. */
const WAIT_FOR_LANES_MS = 5_000;
const ASK_EVERY_MS = 25;

const sleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/** The lanes a worker owns during one drain, held on a session of its own. */
export class LaneOwnership {
  private held: number[] = [];

  private constructor(private readonly sql: SessionSql) {}

  /** Joins the workers draining now (the session must stay open until the drain ends). */
  static async enter(sql: SessionSql): Promise<LaneOwnership> {
    await sql(`SELECT pg_advisory_lock_shared($1, $2)`, [OWNED, PRESENT]);
    return new LaneOwnership(sql);
  }

  /**
   * Keeps this worker's fair share of lanes (all of them, ⌈LANE_COUNT ÷ workers draining⌉ each): gives
   * up the surplus, takes free lanes up to it. Answers the lanes owned now, in order; if none is free,
   * asks again for a while (another worker gives its surplus up at its next claim), then answers none.
   */
  async rebalance(): Promise<number[]> {
    const deadline = Date.now() + WAIT_FOR_LANES_MS;
    for (;;) {
      const [{ workers }] = await this.sql<{ workers: number }>(
        `SELECT count(*)::int AS workers FROM pg_locks
         WHERE locktype = 'advisory' AND granted AND database = (SELECT oid FROM pg_database WHERE datname = current_database())
           AND classid = $1::bigint::oid AND objid = $2::bigint::oid AND objsubid = 2`,
        [OWNED, PRESENT],
      );
      const share = Math.ceil(LANE_COUNT / Math.max(1, workers));
      if (this.held.length > share) {
        const surplus = await this.surplus(share);
        await this.sql(`SELECT pg_advisory_unlock($1, l) FROM unnest($2::int[]) AS l`, [OWNED, surplus]);
        this.held = this.held.filter((l) => !surplus.includes(l));
      } else if (this.held.length < share) {
        const free = Array.from({ length: LANE_COUNT }, (_, l) => l).filter((l) => !this.held.includes(l));
        // The filter runs row by row under the LIMIT: it stops trying once the share is full.
        const taken = await this.sql<{ lane: number }>(`SELECT l AS lane FROM unnest($2::int[]) AS l WHERE pg_try_advisory_lock($1, l) LIMIT $3`, [OWNED, free, share - this.held.length]);
        this.held = [...this.held, ...taken.map((t) => t.lane)].sort((a, b) => a - b);
      }
      if (this.held.length > 0 || Date.now() >= deadline) return [...this.held];
      await sleep(ASK_EVERY_MS);
    }
  }

  /**
   * The lanes to give up to keep `share`, chosen so that what is given up carries its part of the
   * waiting readings: a worker that joins late, or comes back after emptying its own lanes, then gets
   * work rather than empty lanes. Lanes are weighed by the next readings waiting, heaviest first, each
   * to the side further below its part.
   */
  private async surplus(share: number): Promise<number[]> {
    const rows = await this.sql<{ lane: number; n: number }>(
      `SELECT ${laneOfDevice("device_id")} AS lane, count(*)::int AS n FROM (SELECT device_id FROM reading_queue LIMIT $1) q GROUP BY 1`,
      [WEIGH_READINGS],
    );
    return lanesToGiveUp(this.held, new Map(rows.map((r) => [r.lane, r.n])), share);
  }
}

/**
 * Splits the held lanes into `share` to keep and the rest to give up, each side carrying about its
 * part of the weight: heaviest lane first, each to the side whose weight per lane it is to hold is lower.
 */
export function lanesToGiveUp(held: readonly number[], weight: ReadonlyMap<number, number>, share: number): number[] {
  const w = (lane: number) => weight.get(lane) ?? 0;
  const keep = { lanes: [] as number[], n: 0, size: share };
  const give = { lanes: [] as number[], n: 0, size: held.length - share };
  for (const lane of [...held].sort((a, b) => w(b) - w(a) || a - b)) {
    const side = keep.lanes.length === keep.size ? give : give.lanes.length === give.size ? keep : keep.n / keep.size <= give.n / give.size ? keep : give;
    side.lanes.push(lane);
    side.n += w(lane);
  }
  return give.lanes.sort((a, b) => a - b);
}
