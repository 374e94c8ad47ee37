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
export function alarmFigure(v: number | null, unit: string | null, kind?: string): string {
  if (v === null) return "—";
  if (unit === "m") return `${v.toFixed(3)} m`;
  if (!unit && kind) return healthFigure(kind, v);
  return `${Number(v.toFixed(3))}${unit ? ` ${unit}` : ""}`;
}

/** What a health flag's magnitude measures, in words: a gap, a run of readings, a shift or a spacing. */
function healthFigure(kind: string, v: number): string {
  switch (kind) {
    case "offline": {
      const min = Math.round(v / 60);
      return min >= 60 ? `${Math.floor(min / 60)} h ${min % 60} min silent` : `${min} min silent`;
    }
    case "stuck":
    case "out_of_range":
    case "no_echo":
      return `${Math.round(v)} readings`;
    case "drift":
    case "noisy":
      return `${(v * 1000).toFixed(1)} mm`;
    case "crosstalk_risk":
      return `${Math.round(v)} ms apart`;
    default:
      return String(Number(v.toFixed(3)));
  }
}

/** Where the alarm is: its asset, else its device and channel, else its site. */
export function alarmWhere(a: Pick<AlarmJson, "asset" | "channel" | "site">): string {
  return a.asset?.name ?? (a.channel ? `${a.channel.device_name} ch ${a.channel.index}` : a.site.name);
}
