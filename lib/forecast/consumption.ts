// Consumption trend of a tank: find the refills, fit a robust (Theil–Sen) slope to the draw-down
// between them and project it to the reorder level and to empty. Feed it measurements that passed
// validation: a low dropout followed by the true level rises like a refill if it exceeds the threshold.

import { pooledTheilSenSlope, type Point } from "../signal/robust-stats";

const MS_PER_DAY = 86_400_000;

export interface VolumeSample {
  at: Date;
  volumeL: number;
}

export interface Refill {
  /** First reading that shows the rise. */
  at: Date;
  fromL: number;
  toL: number;
  /** Index, in time order, of the last reading before the rise. */
  lowIndex: number;
  /** Index, in time order, of the top of the rise, where the next draw-down begins. */
  peakIndex: number;
}

export interface RefillDetectionOptions {
  /** A rise larger than this (litres) is a refill, not noise. */
  refillThresholdL: number;
  /**
   * A rise built up over several readings within this many seconds also counts (a delivery or a
   * pumped fill seen by a sensor reporting every few minutes). A rise between two consecutive
   * readings counts whatever their gap: a tank does not fill by itself.
   */
  refillSpanS?: number;
}

export interface ConsumptionOptions extends RefillDetectionOptions {
  reorderVolumeL: number;
  /** Defaults to the latest reading's volume. */
  currentVolumeL?: number;
  /** Time the projection starts from; defaults to the latest reading's time. */
  now?: Date;
  /** "latest": only the draw-down since the last refill; "all": every draw-down segment pooled. */
  segments?: "latest" | "all";
}

export interface ConsumptionForecast {
  /** Trend in litres a day; negative while the tank is being drawn down. Null without two distinct times. */
  slopeLPerDay: number | null;
  /** Null when the trend is not falling. Zero when already at or below the level. */
  daysToReorder: number | null;
  daysToEmpty: number | null;
  reorderAt: Date | null;
  emptyAt: Date | null;
  refills: Date[];
}

// A delivery or a pumped refill takes minutes to an hour or two.
const DEFAULT_REFILL_SPAN_S = 2 * 3600;

function inTimeOrder(series: readonly VolumeSample[]): VolumeSample[] {
  return series.filter((s) => Number.isFinite(s.volumeL)).sort((a, b) => a.at.getTime() - b.at.getTime());
}

function findRefills(sorted: readonly VolumeSample[], options: RefillDetectionOptions): Refill[] {
  const { refillThresholdL, refillSpanS = DEFAULT_REFILL_SPAN_S } = options;
  if (!(refillThresholdL > 0)) throw new RangeError("refillThresholdL must be positive");
  const spanMs = refillSpanS * 1000;
  const refills: Refill[] = [];
  let i = 0;
  while (i < sorted.length - 1) {
    // The highest reading reachable from i: the next one always, later ones within the span.
    let peak = i + 1;
    for (let j = i + 2; j < sorted.length && sorted[j].at.getTime() - sorted[i].at.getTime() <= spanMs; j++) {
      if (sorted[j].volumeL > sorted[peak].volumeL) peak = j;
    }
    if (sorted[peak].volumeL - sorted[i].volumeL <= refillThresholdL) {
      i += 1;
      continue;
    }
    // The rise may begin a reading or two later than i; start it at the lowest point before the peak.
    let low = i;
    for (let j = i + 1; j < peak; j++) if (sorted[j].volumeL < sorted[low].volumeL) low = j;
    refills.push({
      at: sorted[low + 1].at,
      fromL: sorted[low].volumeL,
      toL: sorted[peak].volumeL,
      lowIndex: low,
      peakIndex: peak,
    });
    i = peak;
  }
  return refills;
}

/** Refills in a tank's volume series (any order; indices refer to the series sorted by time). */
export function detectRefills(series: readonly VolumeSample[], options: RefillDetectionOptions): Refill[] {
  return findRefills(inTimeOrder(series), options);
}

function toPoints(samples: readonly VolumeSample[], originMs: number): Point[] {
  return samples.map((s) => ({ x: (s.at.getTime() - originMs) / MS_PER_DAY, y: s.volumeL }));
}

/** Consumption trend and the days until the reorder level and until empty. */
export function forecastConsumption(series: readonly VolumeSample[], options: ConsumptionOptions): ConsumptionForecast {
  const sorted = inTimeOrder(series);
  const refills = findRefills(sorted, options);
  const refillDates = refills.map((r) => r.at);
  const empty: ConsumptionForecast = {
    slopeLPerDay: null,
    daysToReorder: null,
    daysToEmpty: null,
    reorderAt: null,
    emptyAt: null,
    refills: refillDates,
  };
  if (sorted.length === 0) return empty;

  // Draw-down segments: from the start (or a refill's peak) to the next refill's low point.
  const segments: VolumeSample[][] = [];
  let start = 0;
  for (const r of refills) {
    segments.push(sorted.slice(start, r.lowIndex + 1));
    start = r.peakIndex;
  }
  segments.push(sorted.slice(start));

  const originMs = sorted[0].at.getTime();
  const used = options.segments === "all" ? segments : segments.slice(-1);
  const slopeLPerDay = pooledTheilSenSlope(used.map((s) => toPoints(s, originMs)));
  if (slopeLPerDay === null) return empty;

  const last = sorted[sorted.length - 1];
  const current = options.currentVolumeL ?? last.volumeL;
  const nowMs = (options.now ?? last.at).getTime();
  if (!(slopeLPerDay < 0)) return { ...empty, slopeLPerDay };

  const rate = -slopeLPerDay;
  const daysToReorder = Math.max(0, (current - options.reorderVolumeL) / rate);
  const daysToEmpty = Math.max(0, current / rate);
  return {
    slopeLPerDay,
    daysToReorder,
    daysToEmpty,
    reorderAt: new Date(nowMs + daysToReorder * MS_PER_DAY),
    emptyAt: new Date(nowMs + daysToEmpty * MS_PER_DAY),
    refills: refillDates,
  };
}
