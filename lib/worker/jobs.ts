// The worker's background jobs on graphile-worker (DEVELOPERS.md, "Background jobs"): alarm e-mails
// from the notification outbox, recompute requests, and the periodic checks node-cron enqueues. Jobs
// are added in SQL (lib/services/job-queue.ts) in the transaction of the change that needs them;
// graphile-worker is woken by LISTEN/NOTIFY when one commits and retries a failed job with
// exponential backoff (e^attempt seconds).

import { Logger, run, runOnce, type Runner, type TaskList } from "graphile-worker";
import { env } from "../env";
import { sqlRows } from "../db/sql";
import { addJob, JOBS } from "../services/job-queue";
import { sendQueuedAlarmMail } from "../services/notifications";
import { drainRecomputeRequests } from "./recompute";
import { markOfflineChannels, refreshForecasts } from "./maintenance";
import { checkAlarms } from "./hooks";

const tasks: TaskList = {
  async [JOBS.sendAlarmMail](payload, helpers) {
    const { notificationIds } = payload as { notificationIds: string[] };
    const sent = await sendQueuedAlarmMail(notificationIds, helpers.job.attempts);
    // Thrown after the attempt was recorded: graphile-worker schedules the next one.
    if (sent.error !== null) throw new Error(`alarm e-mail not delivered: ${sent.error}`);
  },
  async [JOBS.drainRecomputeRequests]() {
    await drainRecomputeRequests();
  },
  async [JOBS.checkAlarms]() {
    await checkAlarms();
  },
  async [JOBS.checkOffline]() {
    // Readings still queued would make their channels look silent: the check waits for the drain.
    const [queue] = await sqlRows<{ waiting: boolean }>(`SELECT EXISTS (SELECT 1 FROM reading_queue) AS waiting`);
    if (!queue.waiting) await markOfflineChannels();
  },
  async [JOBS.refreshForecasts]() {
    await refreshForecasts();
  },
};

// graphile-worker logs every job at info level; the worker keeps its own short log and passes on
// graphile-worker's warnings and errors (a failed send among them) unless WORKER_QUIET.
const logger = new Logger(() => (level, message) => {
  if (!env.worker.quiet && (level === "error" || level === "warning")) console.error(`[jobs] ${message}`);
});
const options = () => ({ connectionString: env.databaseUrl, taskList: tasks, noHandleSignals: true, logger });

/** The long-running job runner of workers/worker.ts. */
export async function startJobRunner(concurrency = 2): Promise<Runner> {
  return run({ ...options(), concurrency });
}

/** Runs every job ready now, then returns (`--once`); retries scheduled for later stay queued. */
export async function runReadyJobs(): Promise<void> {
  await runOnce(options());
}

/** The periodic checks, one pending job each whatever the number of workers (job keys). */
export async function enqueuePeriodicChecks(): Promise<void> {
  for (const name of [JOBS.checkAlarms, JOBS.checkOffline, JOBS.refreshForecasts]) await addJob(name, {}, { jobKey: name, maxAttempts: 1 });
}
