import { ALARM_CAUTION, PRIORITY_GLYPHS } from "@/lib/alarms/engine";
import type { PriorityCounts } from "@/lib/db/queries/overview-alarms";
import { ageWhenOverdue, formatAge } from "@/components/fleet/fleet-figures";

// Words, glyphs and marks every live screen uses for states: a priority is a glyph and a word (its
// colour only repeats them), a sensor fault a hatched tag with the flag's name.

export const PRIORITIES = ["critical", "high", "medium", "low"] as const;
export type Priority = (typeof PRIORITIES)[number];

export const PRIORITY_GLYPH: Record<Priority, string> = PRIORITY_GLYPHS;
const PRIORITY_WORD: Record<Priority, string> = { critical: "Critical", high: "High", medium: "Medium", low: "Low" };
const PRIORITY_TEXT: Record<Priority, string> = { critical: "text-critical", high: "text-high", medium: "text-medium", low: "text-low" };

function asPriority(p: string): Priority {
  return (PRIORITIES as readonly string[]).includes(p) ? (p as Priority) : "low";
}

export const ALARM_STATE_LABELS: Record<string, string> = {
  normal: "Normal",
  unacknowledged: "Unacknowledged",
  acknowledged: "Acknowledged",
  returned_unacknowledged: "Returned, unacknowledged",
  shelved: "Shelved",
  suppressed: "Suppressed",
  out_of_service: "Out of service",
};

export const FLAG_LABELS: Record<string, string> = {
  drift: "Drift",
  stuck: "Stuck",
  noisy: "Noisy",
  offline: "Offline",
  crosstalk_risk: "Crosstalk risk",
  out_of_range: "Out of range",
  no_echo: "No echo",
};

export const flagLabel = (flag: string) => FLAG_LABELS[flag] ?? flag;

/** Glyph and word of a priority, in its colour. */
export function PriorityMark({ priority, count }: { priority: string; count?: number }) {
  const p = asPriority(priority);
  return (
    <span className={`inline-flex items-center gap-1 font-bold ${PRIORITY_TEXT[p]}`}>
      <span aria-hidden="true">{PRIORITY_GLYPH[p]}</span>
      {count != null && <span className="figures">{count}</span>}
      <span>{count != null ? PRIORITY_WORD[p].toLowerCase() : PRIORITY_WORD[p]}</span>
    </span>
  );
}

/** Alarms needing attention by priority; "No alarms" when there are none (no colour then). */
export function AlarmCounts({ counts }: { counts: PriorityCounts }) {
  const present = PRIORITIES.filter((p) => counts[p] > 0);
  if (!present.length) return <span className="text-muted">No alarms</span>;
  return (
    <span className="inline-flex flex-wrap gap-x-3 gap-y-1">
      {present.map((p) => <PriorityMark key={p} priority={p} count={counts[p]} />)}
    </span>
  );
}

/** The hatch of a faulty sensor, as a class for any box. */
export const HATCH = "bg-[repeating-linear-gradient(135deg,rgba(31,42,48,0.28)_0_2px,transparent_2px_7px)]";

/** A sensor-health flag: hatched tag with its name. */
export function FlagTag({ flag }: { flag: string }) {
  return <span className={`inline-block rounded border border-ink/40 bg-card px-1.5 text-xs font-bold ${HATCH}`}>{flagLabel(flag)}</span>;
}

/** The age of a value, shown only once it is overdue (two expected intervals). */
export function OverdueAge({ at, expectedIntervalS, now }: { at: string | null | undefined; expectedIntervalS: number | null | undefined; now?: number }) {
  if (!expectedIntervalS) return null;
  const age = ageWhenOverdue(at, expectedIntervalS, now);
  if (!age) return null;
  return <span className="font-sans text-sm font-bold text-medium" title={at ? new Date(at).toLocaleString() : undefined}> · {age}</span>;
}

/** "for 14 min": how long an alarm has been in its episode. */
export function sinceText(at: string | null | undefined, now?: number): string {
  return at ? formatAge(at, now).replace(/ ago$/, "") : "—";
}

/** The caution every screen with tank alarms carries (PRODUCT.md "Alarms"). */
export function TankCaution() {
  return (
    <p role="note" className="rounded border border-rule bg-card p-3 text-sm">
      <span className="font-bold">Caution: </span>
      {ALARM_CAUTION}
    </p>
  );
}
