import { ALARM_STATE_WORDS } from "@/lib/alarms/vocabulary";
import type { AlarmState } from "@/lib/alarms/state-machine";
import type { AlarmJson } from "@/lib/services/alarms";
import type { Figures } from "@/lib/format/figures";

// An alarm's state in words (bold while it waits for someone), its figures and where it is.

export function AlarmStateLabel({ state, awaitingReset = false }: { state: AlarmState; awaitingReset?: boolean }) {
  const unacked = state === "unacknowledged" || state === "returned_unacknowledged";
  return (
    <span className={unacked ? "font-bold" : state === "normal" ? "text-muted" : undefined} data-state={state}>
      {ALARM_STATE_WORDS[state]}
      {awaitingReset && ", awaiting reset"}
    </span>
  );
}

/** "2.612 m" (or "8.570 ft" in the person's units) or "—", with the unit the alarm carries. */
export function alarmFigure(fig: Figures, v: number | null, unit: string | null, kind?: string): string {
  if (v === null) return "—";
  if (unit === "m") return fig.length(v);
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
