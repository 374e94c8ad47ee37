// The alarm stage as the worker runs it (workers/worker.ts): inside each batch's transaction (suppression
// by design first, then the batch's levels and health flags, then the notices that became due, queued in
// that same transaction: the notification outbox), and between batches (offline flags, silent devices,
// shelves and maintenance windows running out, escalations), once a cycle with `--once` or as the
// periodic `check-alarms` job.

import { getSequelize } from "../db/sequelize";
import type { BatchHook } from "./batch";
import type { CycleHook } from "./cycle";
import { alarmStageInput } from "./compute/alarm-stage";
import { evaluateHealthAlarmsForChannels, evaluateLevelAlarms, expireShelves, sweepHealthAlarms } from "./alarm-evaluation";
import { applyConsequences, sitesOfChannels } from "./consequences";
import { queueDueNotices } from "../services/notifications";
import { coverAlarmsRaisedInMaintenance, endMaintenanceWindows } from "../services/maintenance-windows";

export const alarmBatchHook: BatchHook = {
  name: "alarms",
  async run(batch, { transaction }) {
    const input = alarmStageInput(batch);
    const now = new Date();
    // Suppression first: a level or flag seen from a silent or faulty sensor is then logged, not annunciated.
    await applyConsequences(await sitesOfChannels(input.channelIds, transaction), now, transaction);
    await evaluateLevelAlarms(input.levels, now, transaction);
    await evaluateHealthAlarmsForChannels(input.channelIds, now, transaction);
    // Not waiting for another worker's planning: whatever it leaves, the next check-alarms queues.
    await queueDueNotices(transaction, now, { wait: false });
  },
};

/** Between-batch alarm work: silent devices, health sweep, shelves and maintenance windows running out, alarms raised during maintenance joining their window, and the notices now due (escalations). */
export async function checkAlarms(now = new Date()): Promise<void> {
  await getSequelize().transaction(async (transaction) => {
    await applyConsequences(null, now, transaction);
    await sweepHealthAlarms(now, transaction);
    await expireShelves(now, transaction);
    await endMaintenanceWindows(now, transaction);
    await coverAlarmsRaisedInMaintenance(now, transaction);
    await queueDueNotices(transaction, now, { wait: true });
  });
}

export const alarmCycleHook: CycleHook = {
  name: "alarms",
  async run({ now }) {
    await checkAlarms(now);
  },
};
