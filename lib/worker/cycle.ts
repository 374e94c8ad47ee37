// One worker cycle: drain the reading queue batch by batch, file recomputes for measurements that
// missed late temperature samples, then drain the recompute requests, then the chores that look at
// the fleet as a whole (offline, manual dips, forecasts), then any cycle hooks.

import { drainQueue, type BatchHook } from "./batch";
import { fileLateTemperatureRecomputes } from "./late-temperature";
import { evaluateManualDips, markOfflineChannels, refreshForecasts } from "./maintenance";
import { drainRecomputeRequests } from "./recompute";

/** A step run once per cycle after the queue is drained (e.g. alarm on-delays and escalations). */
export interface CycleHook {
  name: string;
  run(context: { now: Date; drained: boolean }): Promise<void>;
}

export interface CycleOptions {
  batchSize: number;
  /** Stop claiming new batches after this long, so a huge backlog still lets the chores run. */
  maxDrainMs?: number;
  batchHooks?: readonly BatchHook[];
  cycleHooks?: readonly CycleHook[];
  /** Called after each committed batch. */
  afterBatch?: () => void;
  /**
   * Mark offline channels and refresh forecasts in the cycle (`--once`); false when the long-running
   * worker has node-cron enqueue them as jobs instead, so several workers do them once, not each.
   */
  fleetChores?: boolean;
}

export interface CycleResult {
  batches: number;
  readings: number;
  measurements: number;
  /** The queue was empty when the cycle stopped claiming. */
  drained: boolean;
  /** Recompute requests filed for channels measured before their site's temperature samples arrived. */
  lateTemperature: number;
  recomputed: { requests: number; channels: number; measurements: number };
  offlineFlagged: number;
  dipsEvaluated: number;
  forecasts: number;
  ms: number;
  /** Milliseconds spent per step. */
  timings: { drain: number; lateTemperature: number; recompute: number; offline: number; dips: number; forecasts: number; hooks: number };
}

export async function runCycle({ batchSize, maxDrainMs = 60_000, batchHooks = [], cycleHooks = [], afterBatch, fleetChores = true }: CycleOptions): Promise<CycleResult> {
  const started = Date.now();
  const result: CycleResult = {
    batches: 0,
    readings: 0,
    measurements: 0,
    drained: false,
    lateTemperature: 0,
    recomputed: { requests: 0, channels: 0, measurements: 0 },
    offlineFlagged: 0,
    dipsEvaluated: 0,
    forecasts: 0,
    ms: 0,
    timings: { drain: 0, lateTemperature: 0, recompute: 0, offline: 0, dips: 0, forecasts: 0, hooks: 0 },
  };
  let mark = started;
  const lap = (step: keyof CycleResult["timings"]) => {
    const now = Date.now();
    result.timings[step] = now - mark;
    mark = now;
  };
  const drained = await drainQueue(batchSize, batchHooks, maxDrainMs, afterBatch);
  result.batches = drained.batches;
  result.readings = drained.readings;
  result.measurements = drained.measurements;
  result.drained = drained.drained;
  lap("drain");
  result.lateTemperature = await fileLateTemperatureRecomputes();
  lap("lateTemperature");
  result.recomputed = await drainRecomputeRequests();
  lap("recompute");
  if (fleetChores && result.drained) result.offlineFlagged = await markOfflineChannels();
  lap("offline");
  result.dipsEvaluated = await evaluateManualDips();
  lap("dips");
  if (fleetChores) result.forecasts = await refreshForecasts();
  lap("forecasts");
  for (const hook of cycleHooks) await hook.run({ now: new Date(), drained: result.drained });
  lap("hooks");
  result.ms = Date.now() - started;
  return result;
}
