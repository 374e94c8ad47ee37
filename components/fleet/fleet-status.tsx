import { ALARM_CAUTION } from "@/lib/alarms/engine";
import { PriorityBadge } from "@/components/ui/priority-badge";
import type { PriorityCounts } from "@/lib/read-models/overview-alarms";
import { formatDuration, isOverdue } from "@/components/fleet/fleet-figures";
import { RelativeTime } from "@/components/ui/site-time";

// Marks every live screen uses for states: alarm counts by priority (drawn by the priority badge), a
// sensor fault a hatched tag with the flag's name.

export const PRIORITIES = ["critical", "high", "medium", "low"] as const;
export type Priority = (typeof PRIORITIES)[number];

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

/** Alarms needing attention by priority; "No alarms" when there are none (no colour then). */
export function AlarmCounts({ counts }: { counts: PriorityCounts }) {
  const present = PRIORITIES.filter((p) => counts[p] > 0);
  if (!present.length) return <span className="text-muted">No alarms</span>;
  return (
    <span className="inline-flex flex-wrap gap-x-3 gap-y-1">
      {present.map((p) => <PriorityBadge key={p} priority={p} count={counts[p]} />)}
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
export function OverdueAge({ at, expectedIntervalS, now, zone = "UTC" }: { at: string | null | undefined; expectedIntervalS: number | null | undefined; now?: number; zone?: string }) {
  if (!expectedIntervalS) return null;
  if (!isOverdue(at, expectedIntervalS, now)) return null;
  return (
    <span className="font-sans text-sm font-bold text-medium">
      {" · "}
      {at ? <RelativeTime at={at} zone={zone} now={now === undefined ? undefined : new Date(now)} /> : "no value yet"}
    </span>
  );
}

/** "for 14 min": how long an alarm has been in its episode. */
export function sinceText(at: string | null | undefined, now?: number): string {
  return at ? formatDuration(((now ?? Date.now()) - new Date(at).getTime()) / 1000) : "—";
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
