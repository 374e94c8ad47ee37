import { ALARM_PRIORITIES, type AlarmPriority } from "@/lib/alarms/state-machine";
import { PRIORITY_GLYPHS, PRIORITY_WORDS } from "@/lib/alarms/vocabulary";

// The only place the priority glyphs ◆▲■● are drawn: they mean an alarm's priority and nothing else.
const PRIORITY_TEXT: Record<AlarmPriority, string> = { critical: "text-critical", high: "text-high", medium: "text-medium", low: "text-low" };

function asPriority(p: string): AlarmPriority {
  return (ALARM_PRIORITIES as readonly string[]).includes(p) ? (p as AlarmPriority) : "low";
}

/** Glyph and word of a priority, in its colour (muted once the alarm is normal); with a count, "3 high". */
export function PriorityBadge({ priority, count, calm = false }: { priority: string; count?: number; calm?: boolean }) {
  const p = asPriority(priority);
  const word = PRIORITY_WORDS[p];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap font-bold ${calm ? "text-muted" : PRIORITY_TEXT[p]}`}>
      <span aria-hidden="true">{PRIORITY_GLYPHS[p]}</span>
      {count != null && <span className="figures">{count}</span>}
      <span>{count != null ? word.toLowerCase() : word}</span>
    </span>
  );
}

/** The glyph alone, for a drawing (the sounding strip's setpoint ticks) whose label already says the setpoint. */
export function priorityGlyph(priority: string): string {
  return PRIORITY_GLYPHS[asPriority(priority)];
}
