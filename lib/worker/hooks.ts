// The alarm and notify stages as the worker runs them (workers/worker.ts): the alarm stage inside each
// batch's transaction (the batch's levels and health flags), and once a cycle for what happens between
// batches (offline flags, silent devices, shelves and maintenance windows running out); the notify
// stage once a cycle after it.

import { getSequelize } from "../db/sequelize";
import type { BatchHook } from "./batch";
import type { CycleHook } from "./cycle";
import { alarmStageInput } from "./compute/alarm-stage";
import { evaluateHealthAlarmsForChannels, evaluateLevelAlarms, expireShelves, sweepHealthAlarms } from "./alarm-evaluation";
import { runNotifications } from "../services/notifications";
import { applyConsequences, sitesOfChannels } from "./consequences";
import { endMaintenanceWindows } from "../services/maintenance-windows";

export const alarmBatchHook: BatchHook = {
  name: "alarms",
  async run(batch, { transaction }) {
    const input = alarmStageInput(batch);
    const now = new Date();
    // Suppression first: a level or flag seen from a silent or faulty sensor is then logged, not annunciated.
    await applyConsequences(await sitesOfChannels(input.channelIds, transaction), now, transaction);
    await evaluateLevelAlarms(input.levels, now, transaction);
    await evaluateHealthAlarmsForChannels(input.channelIds, now, transaction);
  },
};

export const alarmCycleHook: CycleHook = {
  name: "alarms",
  async run({ now }) {
    await getSequelize().transaction(async (transaction) => {
      await applyConsequences(null, now, transaction);
      await sweepHealthAlarms(now, transaction);
      await expireShelves(now, transaction);
      await endMaintenanceWindows(now, transaction);
    });
  },
};

export const notifyCycleHook: CycleHook = {
  name: "notify",
  async run({ now }) {
    await runNotifications(now);
  },
};
