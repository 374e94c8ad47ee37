// The alarm and notify stages as the worker runs them (workers/worker.ts): the alarm stage inside each
// batch's transaction (the batch's levels and health flags), and once a cycle for what happens between
// batches (offline flags, shelves running out); the notify stage once a cycle after it.

import { getSequelize } from "../db/sequelize";
import type { BatchHook } from "./batch";
import type { CycleHook } from "./cycle";
import { alarmStageInput } from "./compute/alarm-stage";
import { evaluateHealthAlarmsForChannels, evaluateLevelAlarms, expireShelves, sweepHealthAlarms } from "./alarm-evaluation";
import { runNotifications } from "../services/notifications";

export const alarmBatchHook: BatchHook = {
  name: "alarms",
  async run(batch, { transaction }) {
    const input = alarmStageInput(batch);
    await evaluateLevelAlarms(input.levels, transaction);
    await evaluateHealthAlarmsForChannels(input.channelIds, transaction);
  },
};

export const alarmCycleHook: CycleHook = {
  name: "alarms",
  async run({ now }) {
    await getSequelize().transaction(async (transaction) => {
      await sweepHealthAlarms(transaction);
      await expireShelves(now, transaction);
    });
  },
};

export const notifyCycleHook: CycleHook = {
  name: "notify",
  async run({ now }) {
    await runNotifications(now);
  },
};
