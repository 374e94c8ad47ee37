import { PRIORITY_GLYPHS } from "@/lib/alarms/engine";
import type { AlarmPriority, AlarmState } from "@/lib/alarms/state-machine";
import type { AlarmJson } from "@/lib/db/queries/alarms";

// Priority and state told in words and a glyph; colour only while the alarm is not normal.
const PRIORITY_TEXT: Record<AlarmPriority, string> = { critical: "text-critical", high: "text-high", medium: "text-medium", low: "text-low" };

export const STATE_WORDS: Record<AlarmState, string> = {
  normal: "Normal",
  unacknowledged: "Unacknowledged",
  acknowledged: "Acknowledged",
  returned_unacknowledged: "Cleared, unacknowledged",
  shelved: "Shelved",
  suppressed: "Suppressed",
  out_of_service: "Out of service",
};

export function AlarmPriorityBadge({ priority, calm = false }: { priority: AlarmPriority; calm?: boolean }) {
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap font-bold ${calm ? "text-muted" : PRIORITY_TEXT[priority]}`}>
      <span aria-hidden="true">{PRIORITY_GLYPHS[priority]}</span>
      <span>{priority[0].toUpperCase() + priority.slice(1)}</span>
    </span>
  );
}

export function AlarmStateLabel({ state, awaitingReset = false }: { state: AlarmState; awaitingReset?: boolean }) {
  const unacked = state === "unacknowledged" || state === "returned_unacknowledged";
  return (
    <span className={unacked ? "font-bold" : state === "normal" ? "text-muted" : undefined} data-state={state}>
      {STATE_WORDS[state]}
      {awaitingReset && ", awaiting reset"}
    </span>
  );
}

/** "2.612 m" or "—", with the unit the alarm carries. */
export function alarmFigure(v: number | null, unit: string | null): string {
  if (v === null) return "—";
  return unit === "m" ? `${v.toFixed(3)} m` : `${Number(v.toFixed(3))}${unit ? ` ${unit}` : ""}`;
}

/** Where the alarm is: its asset, else its device and channel, else its site. */
export function alarmWhere(a: Pick<AlarmJson, "asset" | "channel" | "site">): string {
  return a.asset?.name ?? (a.channel ? `${a.channel.device_name} ch ${a.channel.index}` : a.site.name);
}
