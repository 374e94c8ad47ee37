// Batches of the worker: claim waiting readings, run the pipeline stages, write everything and delete
// the claimed queue rows, all in one transaction per batch. A worker killed mid-batch rolls back and
// the readings wait for the next; two workers never claim the same reading (FOR UPDATE SKIP LOCKED),
// and measurements are unique per reading, so nothing is lost or written twice. Several workers claim
// from disjoint lanes of devices (lanes.ts), so their batches touch disjoint channels.
//
// One batch, phase by phase: claim (claimBatch) → load channels (claimNextBatch, batch-store.ts) →
// compute (prepareBatch, compute/batch.ts) → encode (encodeBatch, encode.ts) → write
// (writeEncodedBatch and the batch hooks) → commit (commitBatch). drainQueue runs them.
//
// Draining is pipelined: while one batch's transaction writes, the next batch is claimed and computed
// from the channel states the first will leave. Before it writes, it locks those states and checks
// their versions; if anyone else changed one meanwhile, it computes again from what is stored.

import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { QUEUED_READING_COLUMNS } from "./reading-queue";
import { processBatch, processBatchInSteps, type ProcessedBatch } from "./compute/batch";
import type { ChannelState } from "./compute/channel-state";
import type { ChannelConfig, ReadingRow } from "./compute/types";
import { exactMicros, loadChannelsOfDevices, loadTemperatureChannelSites, loadTemperatureSamples, lockChannelStates, fetchReadings, MICROS_TO_TIMESTAMPTZ, readingsAsArrays, type FetchedReadings, type LockedChannelState, type SubMillis } from "./batch-store";
import { encodeBatch, writeEncodedBatch, type EncodedBatch } from "./encode";
import { sqlRows, sqlRun, withSession } from "../db/sql";
import { CLAIMING, LANE_COUNT, LaneOwnership, laneOfDevice } from "./lanes";

/**
 * A step that runs inside the batch's transaction after its measurements and flags are written:
 * where alarm evaluation (and the notifications it queues) plugs in. A hook that throws rolls the
 * whole batch back, so the readings are retried rather than measured without their alarms.
 */
export interface BatchHook {
  name: string;
  run(batch: ProcessedBatch, context: { transaction: Transaction; channels: ReadonlyMap<string, ChannelConfig> }): Promise<void>;
}

export interface BatchResult {
  claimed: number;
  measurements: number;
  buckets: number;
}

/** Where a claim starts: after this reading's exact time and id (the queue's order), in these lanes. */
interface ClaimKey {
  micros: number;
  id: number;
  lanes: readonly number[];
}

// A claim holds the session-level claim lock of each of its lanes (lanes.ts) until its batch has queued
// for its channels' state rows, so the batches with readings of one channel are claimed in time order
// and lock that channel's state in the same order, whichever worker claims them.
const takeClaimLocks = (lanes: readonly number[], transaction: Transaction) =>
  sqlRun(`SELECT pg_advisory_lock($1, l) FROM unnest($2::int[]) AS l`, [CLAIMING, [...lanes].sort((a, b) => a - b)], { transaction });

/**
 * Claims the oldest waiting readings this transaction can lock, or the oldest after `after` (the last
 * reading of the batch in flight): the rows of that batch are still in the queue, deleted but not yet
 * committed, and skipping 40 000 locked rows one by one was nearly half of the claim.
 */
async function claimBatch(batchSize: number, transaction: Transaction, lanes: readonly number[], after: ClaimKey | null): Promise<FetchedReadings> {
  // The rows are deleted by the row addresses the locking subquery returns (they cannot move while
  // locked): cheaper than looking each up again by primary key. fetchReadings puts them in time order.
  // A worker that owns every lane claims without a lane filter.
  const bind: unknown[] = [batchSize];
  const where: string[] = [];
  if (after) where.push(`(at, reading_id) > (${MICROS_TO_TIMESTAMPTZ(`$${bind.push(after.micros)}`)}, $${bind.push(after.id)}::bigint)`);
  if (lanes.length < LANE_COUNT) where.push(`${laneOfDevice("device_id")} = ANY($${bind.push(lanes)}::int[])`);
  return fetchReadings(
    `WITH claimed AS (
       DELETE FROM reading_queue
       WHERE ctid = ANY(ARRAY(SELECT ctid FROM reading_queue ${where.length ? `WHERE ${where.join(" AND ")}` : ""} ORDER BY at, reading_id LIMIT $1 FOR UPDATE SKIP LOCKED))
       RETURNING reading_id AS id, at, ${QUEUED_READING_COLUMNS.join(", ")}
     )
     ${readingsAsArrays("claimed r")}`,
    bind,
    transaction,
  );
}

/**
 * Locks state rows the batch in flight holds and releases the claim locks in one statement: the unlock
 * is computed only after the locking subquery has its rows, so no other worker can claim in between.
 * Answers the rows' versions only: the states themselves are needed when a version is not the expected one.
 */
async function lockCarriedAndRelease(channelIds: string[], transaction: Transaction): Promise<Map<string, number>> {
  const [row] = await sqlRows<{ rows: { channel_id: string; version: number }[] | null }>(
    `SELECT json_agg(x ORDER BY x.channel_id) AS rows, pg_advisory_unlock_all() AS released
     FROM (SELECT channel_id, version FROM channel_state WHERE channel_id = ANY($1::uuid[]) ORDER BY channel_id FOR UPDATE) x`,
    [[...channelIds].sort()],
    { transaction },
  );
  return new Map((row?.rows ?? []).map((r) => [r.channel_id, Number(r.version)]));
}

/** The channel states a batch in flight will commit, and the versions they will have. */
type Expected = Map<string, { state: ChannelState; offlineSince: Date | null; version: number }>;

interface Prepared {
  transaction: Transaction;
  claimed: number;
  channels: Map<string, ChannelConfig>;
  batch: ProcessedBatch;
  /** The batch's big writes, encoded while the batch before it is still being written. */
  encoded: EncodedBatch;
  /** Resolves when the state rows are locked and the batch is sure to be computed from them. */
  ready: Promise<void>;
  /** Versions of the state rows once this batch has written them. */
  written: () => Expected;
}

function mergeStates(...parts: Map<string, LockedChannelState>[]): Map<string, LockedChannelState> {
  const out = new Map<string, LockedChannelState>();
  for (const part of parts) for (const [id, s] of part) out.set(id, s);
  return out;
}

/** A batch being written, and the promise of its commit. */
interface InFlight {
  prepared: Prepared;
  commit: Promise<BatchResult>;
}

/** A claimed batch and what computing it needs from the database, its transaction holding the claim locks. */
interface Claimed {
  transaction: Transaction;
  /** The lanes it was claimed from. */
  lanes: readonly number[];
  readings: ReadingRow[];
  subMillis: SubMillis;
  channelList: ChannelConfig[];
  /** Ids of the channels the readings are for. */
  ids: string[];
  temperatureSamples: Awaited<ReturnType<typeof loadTemperatureSamples>>;
  temperatureChannelSites: Map<string, string[]>;
}

/** Lets pending database replies be handled before computing goes on. */
const yieldToIo = () => new Promise<void>((resolve) => setImmediate(resolve));

// The claim locks are the only session-level advisory locks on a batch's connection.
const releaseClaimLocks = (transaction: Transaction) => sqlRun(`SELECT pg_advisory_unlock_all()`, [], { transaction });

/**
 * Opens a batch's transaction, takes the lanes this worker owns now and their claim locks, and claims
 * waiting readings of those lanes (those after `after` first, if given) with what computing them needs
 * but the channel states. The locks are still held when this resolves (until prepareBatch queues for
 * the states), unless nothing was waiting in them (or no lane was free): then it resolves to null.
 */
async function claimNextBatch(batchSize: number, ownership: LaneOwnership, previous: ClaimKey | null = null): Promise<Claimed | null> {
  const lanes = await ownership.rebalance();
  if (lanes.length === 0) return null;
  // Starting after the batch in flight is right only in lanes it was claimed from: a lane taken over
  // since may have readings waiting before that point.
  const after = previous && lanes.every((l) => previous.lanes.includes(l)) ? previous : null;
  const transaction = await getSequelize().transaction();
  try {
    // A crash of the database can lose only whole batches, which roll back with their queue deletions.
    // JIT compilation would cost more than these short, wide statements take to run.
    await sqlRun(`SET LOCAL synchronous_commit = off; SET LOCAL jit = off`, [], { transaction });
    await takeClaimLocks(lanes, transaction);
    // Readings that came in late behind the batch in flight are claimed once those after it are done.
    let fetched = await claimBatch(batchSize, transaction, lanes, after);
    if (fetched.readings.length === 0 && after) fetched = await claimBatch(batchSize, transaction, lanes, null);
    const { readings, subMillis } = fetched;
    if (readings.length === 0) {
      await abandonClaim({ transaction });
      return null;
    }
    const channelList = await loadChannelsOfDevices([...new Set(readings.map((r) => r.deviceId))], transaction);
    const present = new Map<string, Set<number>>();
    for (const r of readings) {
      const indexes = present.get(r.deviceId);
      if (indexes) indexes.add(r.channel);
      else present.set(r.deviceId, new Set([r.channel]));
    }
    const ids = channelList.filter((c) => present.get(c.device.id)?.has(c.index)).map((c) => c.id);
    let from = Infinity;
    let to = -Infinity;
    for (const r of readings) {
      from = Math.min(from, r.at.getTime());
      to = Math.max(to, r.at.getTime());
    }
    const temperatureSamples = await loadTemperatureSamples([...new Set(channelList.map((c) => c.site.id))], new Date(from), new Date(to), transaction);
    const temperatureChannelSites = await loadTemperatureChannelSites(channelList.map((c) => c.id), transaction);
    return { transaction, lanes, readings, subMillis, channelList, ids, temperatureSamples, temperatureChannelSites };
  } catch (err) {
    await releaseClaimLocks(transaction).catch(() => undefined);
    await transaction.rollback().catch(() => undefined);
    throw err;
  }
}

/** Gives a claimed batch back: its readings return to the queue and the claim locks are released. */
async function abandonClaim(claimed: Pick<Claimed, "transaction">): Promise<void> {
  await releaseClaimLocks(claimed.transaction).catch(() => undefined);
  await claimed.transaction.rollback().catch(() => undefined);
}

/**
 * Computes a claimed batch. Channels that the batch in flight (`before`) is writing are computed
 * from the states it will leave, and their rows are locked in the background; the batch is `ready`
 * once those locks are held and the stored versions match (or it has been recomputed). `beforeCompute`
 * runs once this batch has queued for its states (so the claim locks may pass on) and before the
 * computing starts: the next claim goes to the database then, and runs there meanwhile.
 */
async function prepareBatch(claimed: Claimed, before: InFlight | null, beforeCompute: () => void): Promise<Prepared> {
  const { transaction, readings, subMillis, channelList, ids, temperatureSamples, temperatureChannelSites } = claimed;
  const inFlight = before?.commit ?? null;
  let unlocked = false;
  try {
    // The batch in flight must hold all its state rows before this one queues for them: rows the batch
    // before it created become visible to its lock only now, and taking one of them first would leave
    // the two batches waiting for each other. Its states are final from then on, too.
    if (before) await before.prepared.ready.catch(() => undefined);
    const expected = before ? before.prepared.written() : null;
    const carried = ids.filter((id) => expected?.has(id));
    const fresh = await lockChannelStates(ids.filter((id) => !expected?.has(id)), transaction);
    // Queued before the claim locks are released, so no later batch can take these rows first; the lock
    // is granted when the batch in flight commits, and this connection waits for it meanwhile.
    unlocked = true;
    const carriedLocked = lockCarriedAndRelease(carried, transaction);
    carriedLocked.catch(() => undefined);
    beforeCompute();

    const assumed = mergeStates(fresh, new Map(carried.map((id) => [id, expected!.get(id)!])));
    const input = { readings, channels: channelList, temperatureSamples, temperatureChannelSites };
    // In turns, so the write of the batch before goes on from statement to statement meanwhile.
    let batch = await processBatchInSteps({ ...input, states: assumed }, yieldToIo);
    await yieldToIo();
    let encoded = encodeBatch(batch, subMillis);
    let states = assumed;

    const ready = (async () => {
      await inFlight;
      const versions = await carriedLocked;
      // Rows the batch in flight created were invisible to the lock until it committed: they are locked
      // (and read) now, as are all of them when anyone else changed one meanwhile.
      const changed = versions.size < carried.length || carried.some((id) => versions.get(id) !== expected!.get(id)!.version);
      if (changed) {
        const locked = await lockChannelStates(carried, transaction);
        if (carried.some((id) => locked.get(id)?.version !== expected!.get(id)!.version)) {
          states = mergeStates(fresh, locked);
          batch = processBatch({ ...input, states });
          encoded = encodeBatch(batch, subMillis);
        }
      }
    })();
    // Awaited by commitBatch; until then a failure must not count as unhandled.
    ready.catch(() => undefined);
    return {
      transaction,
      claimed: readings.length,
      channels: new Map(channelList.map((c) => [c.id, c])),
      get batch() {
        return batch;
      },
      get encoded() {
        return encoded;
      },
      ready,
      written: () => {
        const cleared = new Set(batch.offlineCleared.map((o) => o.channelId));
        const out: Expected = new Map();
        for (const [id, state] of batch.states) {
          const previous = states.get(id);
          out.set(id, { state, offlineSince: cleared.has(id) ? null : (previous?.offlineSince ?? null), version: (previous?.version ?? 0) + 1 });
        }
        return out;
      },
    };
  } catch (err) {
    if (!unlocked) await releaseClaimLocks(transaction).catch(() => undefined);
    await transaction.rollback().catch(() => undefined);
    throw err;
  }
}

async function commitBatch(p: Prepared, hooks: readonly BatchHook[]): Promise<BatchResult> {
  try {
    await p.ready;
    const written = await writeEncodedBatch(p.encoded, p.transaction);
    for (const hook of hooks) await hook.run(p.batch, { transaction: p.transaction, channels: p.channels });
    await p.transaction.commit();
    return { claimed: p.claimed, measurements: written.inserted, buckets: written.buckets };
  } catch (err) {
    await p.transaction.rollback().catch(() => undefined);
    throw err;
  }
}

const queueIsEmpty = async () => (await sqlRows<{ empty: boolean }>(`SELECT NOT EXISTS (SELECT 1 FROM reading_queue) AS empty`, [], { primary: true }))[0].empty;

export interface DrainResult {
  batches: number;
  readings: number;
  measurements: number;
  /** The queue was empty when draining stopped. */
  drained: boolean;
}

/**
 * Works through the lanes this worker owns, two batches in flight at a time, until nothing waits in
 * them or `maxMs` has passed. `afterBatch` runs after each commit (the worker uses it to keep its
 * memory in check).
 */
export async function drainQueue(batchSize: number, hooks: readonly BatchHook[] = [], maxMs = Infinity, afterBatch: () => void = () => undefined): Promise<DrainResult> {
  // The lanes are owned on a session of their own, held for the whole drain.
  return withSession(async (session) => drainLanes(await LaneOwnership.enter(session), batchSize, hooks, maxMs, afterBatch));
}

async function drainLanes(ownership: LaneOwnership, batchSize: number, hooks: readonly BatchHook[], maxMs: number, afterBatch: () => void): Promise<DrainResult> {
  const started = Date.now();
  const result: DrainResult = { batches: 0, readings: 0, measurements: 0, drained: false };
  const add = (r: BatchResult) => {
    result.batches += 1;
    result.readings += r.claimed;
    result.measurements += r.measurements;
    afterBatch();
  };
  let inFlight: InFlight | null = null;
  let claiming: Promise<Claimed | null> | null = claimNextBatch(batchSize, ownership);
  let next: Prepared | null = null;
  try {
    for (;;) {
      const claimed: Claimed | null = await claiming;
      claiming = null;
      if (claimed === null) {
        if (inFlight) add(await inFlight.commit);
        inFlight = null;
        // This worker's lanes are empty; other workers may still be busy with theirs.
        result.drained = await queueIsEmpty();
        break;
      }
      const more = Date.now() - started <= maxMs;
      next = await prepareBatch(claimed, inFlight, () => {
        if (!more) return;
        const last = claimed.readings[claimed.readings.length - 1];
        claiming = claimNextBatch(batchSize, ownership, { micros: exactMicros(last, claimed.subMillis), id: last.id, lanes: claimed.lanes });
        // Awaited in the next round; a failure meanwhile must not count as unhandled.
        claiming.catch(() => undefined);
      });
      if (inFlight) add(await inFlight.commit);
      inFlight = { prepared: next, commit: commitBatch(next, hooks) };
      next = null;
      if (!more) break;
    }
    if (inFlight) add(await inFlight.commit);
  } catch (err) {
    // A failed batch takes the ones prepared and claimed after it down too: they were computed from it.
    if (next) await next.transaction.rollback().catch(() => undefined);
    if (inFlight) await inFlight.commit.catch(() => undefined);
    const pending: Claimed | null = await Promise.resolve(claiming).catch(() => null);
    if (pending) await abandonClaim(pending);
    throw err;
  }
  return result;
}
