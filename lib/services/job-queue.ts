// Jobs for the worker's graphile-worker runner (lib/worker/jobs.ts), added in SQL so that a job commits
// or rolls back with the change that asked for it (DEVELOPERS.md, "Background jobs").

import type { Transaction } from "sequelize";
import { sqlRows } from "../db/sql";

export const JOBS = {
  sendAlarmMail: "send-alarm-mail",
  drainRecomputeRequests: "drain-recompute-requests",
  checkAlarms: "check-alarms",
  checkOffline: "check-offline",
  refreshForecasts: "refresh-forecasts",
} as const;
export type JobName = (typeof JOBS)[keyof typeof JOBS];

export interface AddJobOptions {
  transaction?: Transaction | null;
  /** One pending job per key: a second add while one waits leaves a single job (graphile-worker's job_key). */
  jobKey?: string;
  maxAttempts?: number;
}

/** Adds a job in the caller's transaction; it runs once that transaction commits (graphile-worker wakes on NOTIFY). */
export async function addJob(name: JobName, payload: Record<string, unknown>, options: AddJobOptions = {}): Promise<void> {
  await sqlRows(
    `SELECT 1 FROM graphile_worker.add_job(:name, CAST(:payload AS json), job_key := :jobKey, max_attempts := :maxAttempts, job_key_mode := 'preserve_run_at')`,
    { name, payload: JSON.stringify(payload), jobKey: options.jobKey ?? null, maxAttempts: options.maxAttempts ?? 25 },
    { transaction: options.transaction },
  );
}
