// The alarm stage as the worker runs it (workers/worker.ts): inside each batch's transaction (the
// batch's levels and health flags, then the notices that became due, queued in that same transaction:
// the notification outbox), and between batches (offline flags, shelves running out, escalations),
// once a cycle with `--once` or as the periodic `check-alarms` job.

import { getSequelize } from "../db/sequelize";
import type { BatchHook } from "./batch";
import type { CycleHook } from "./cycle";
import { alarmStageInput } from "./compute/alarm-stage";
import { evaluateHealthAlarmsForChannels, evaluateLevelAlarms, expireShelves, sweepHealthAlarms } from "./alarm-evaluation";
import { queueDueNotices } from "../services/notifications";

export const alarmBatchHook: BatchHook = {
  name: "alarms",
  async run(batch, { transaction }) {
    const input = alarmStageInput(batch);
    await evaluateLevelAlarms(input.levels, transaction);
    await evaluateHealthAlarmsForChannels(input.channelIds, transaction);
    // Not waiting for another worker's planning: whatever it leaves, the next check-alarms queues.
    await queueDueNotices(transaction, new Date(), { wait: false });
  },
};

/** Between-batch alarm work: health sweep, shelves running out, and the notices now due (escalations). */
export async function checkAlarms(now = new Date()): Promise<void> {
  await getSequelize().transaction(async (transaction) => {
    await sweepHealthAlarms(transaction);
    await expireShelves(now, transaction);
    await queueDueNotices(transaction, now, { wait: true });
  });
}

export const alarmCycleHook: CycleHook = {
  name: "alarms",
  async run({ now }) {
    await checkAlarms(now);
  },
};
