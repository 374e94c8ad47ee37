// History is recorded, not announced. Readings that arrive late (a field unit's store-and-forward
// after a link outage, the simulator's backfill, a CSV import) still produce every alarm event at the
// measurement's own time, but nobody is told about a state that is no longer current, and the gaps a
// backfill fills are not outages. Pure: the alarm stage and the notify stage apply these rules.
//
// Three rules:
// 1. An occurrence that activated AND cleared in readings the worker saw only afterwards was never
//    shown to anyone: it is kept as returned-to-normal history (close_as_history: logged, lands in
//    normal, no notice). A latching alarm is the exception: it still asks for its reset.
// 2. An alarm's state is current only while its evaluation has reached readings measured within
//    LATE_AFTER_S of now. A first notice waits until then: if the catching-up readings clear it, rule 1
//    applies; if it is still active, it is announced as active now.
// 3. A channel is offline only for an outage observed live: a span of wall-clock time in which no
//    reading ARRIVED for the offline limit (3 expected intervals, PRODUCT.md). A gap in measurement
//    times that the same backfill filled while readings kept arriving is a data gap, stored as such.
//    A store-and-forward unit whose link was down was observed silent: its outage is an offline alarm
//    even though its buffered readings later fill the data gap.

import { type AlarmRecord, type EngineEvent, type EngineResult, applyAlarmInput } from "./engine";
import { type Instant, instantToMs } from "./state-machine";

/** Readings measured longer than this before the worker sees them are late (Halftrip's choice: 3 × the usual 5-min interval). */
export const LATE_AFTER_S = 900;
/** Offline after this many expected intervals without a reading (PRODUCT.md: "no reading for 3 expected intervals"). */
export const OFFLINE_AFTER_INTERVALS = 3;

/** True when a reading measured at `measuredAt` and seen at `seenAt` is late. */
export function isLateReading(measuredAt: Instant, seenAt: Instant, lateAfterS = LATE_AFTER_S): boolean {
  return instantToMs(seenAt) - instantToMs(measuredAt) > lateAfterS * 1000;
}

/** Rule 2: the alarm's state is known as of now (its evaluation reached recent readings). */
export function isStateCurrent(evaluatedUntil: Instant | null, now: Instant, lateAfterS = LATE_AFTER_S): boolean {
  return evaluatedUntil !== null && !isLateReading(evaluatedUntil, now, lateAfterS);
}

/**
 * Rule 1, after the engine evaluated a batch: when the record ends returned-unacknowledged and its
 * current episode began in this very evaluation (`events`), the occurrence was never shown active:
 * it is closed as history with a logged event. Otherwise the result is returned unchanged.
 */
export function keepUnseenOccurrenceAsHistory(result: EngineResult, seenAt: Instant): EngineResult {
  const { record, events } = result;
  if (record.snapshot.state !== "returned_unacknowledged" || record.snapshot.latching) return result;
  const began = events.some((e) => (e.kind === "activated" || e.kind === "re_alarmed") && e.episode === record.episode);
  if (!began) return result;
  const clearedAt = record.clearedAt ?? new Date(instantToMs(seenAt)).toISOString();
  const closed = applyAlarmInput(record, { type: "close_as_history" }, {
    at: clearedAt,
    cause: `activated and cleared in readings seen only at ${new Date(instantToMs(seenAt)).toISOString()}: recorded as history, not announced`,
  });
  if (!closed.ok) return result;
  const out: AlarmRecord = closed.result.record;
  const added: EngineEvent[] = closed.result.events;
  return { record: out, events: [...events, ...added] };
}

export interface Outage {
  /** The last arrival + the offline limit: when the silence became an outage. */
  from: string;
  /** The next arrival, or null while it lasts. */
  until: string | null;
}

/**
 * Rule 3: the outages observed live, from the wall-clock times readings of a channel (or a device)
 * arrived. Any order; `now` closes the timeline (an outage still running has until = null).
 */
export function observedOutages(arrivals: readonly Instant[], expectedIntervalS: number, now: Instant, intervals = OFFLINE_AFTER_INTERVALS): Outage[] {
  if (!(expectedIntervalS > 0)) throw new RangeError("expected interval must be positive");
  const limitMs = intervals * expectedIntervalS * 1000;
  const nowMs = instantToMs(now);
  const times = arrivals.map(instantToMs).filter((t) => t <= nowMs).sort((a, b) => a - b);
  const out: Outage[] = [];
  for (let i = 0; i < times.length; i++) {
    const deadline = times[i] + limitMs;
    const next = i + 1 < times.length ? times[i + 1] : null;
    if (next !== null && next > deadline) out.push({ from: new Date(deadline).toISOString(), until: new Date(next).toISOString() });
    if (next === null && nowMs > deadline) out.push({ from: new Date(deadline).toISOString(), until: null });
  }
  return out;
}

/**
 * Whether a gap between two measurement times is an offline period to alarm on: only when an outage
 * observed live overlaps it. Measurement and arrival share one clock here (the device's clock is
 * assumed right, as everywhere else in the worker).
 */
export function isGapObservedLive(gapFrom: Instant, gapTo: Instant, outages: readonly Outage[], now: Instant): boolean {
  const a = instantToMs(gapFrom);
  const b = instantToMs(gapTo);
  const nowMs = instantToMs(now);
  return outages.some((o) => instantToMs(o.from) < b && (o.until === null ? nowMs : instantToMs(o.until)) > a);
}
