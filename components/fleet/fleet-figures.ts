// How the live screens write durations and forecasts, and when a value is overdue (its age: RelativeTime).
// Figures with a unit come from useFigures() (components/ui/display-settings.tsx), in the person's units.
// Pure functions (no React, no I/O) shared by the overview, site, asset and device-health screens.

/** A value is overdue once it is older than two of its device's expected reporting intervals. */
export function isOverdue(at: Date | string | number | null | undefined, expectedIntervalS: number, now: Date | number = Date.now()): boolean {
  if (at == null) return true;
  return new Date(now).getTime() - new Date(at).getTime() > 2 * expectedIntervalS * 1000;
}

/** Time in a state: "45 min", "2 h 14 min", "3 d 4 h". */
export function formatDuration(seconds: number): string {
  if (!(seconds >= 0)) return "—";
  const minutes = Math.floor(seconds / 60);
  if (minutes < 1) return "under a minute";
  if (minutes < 60) return `${minutes} min`;
  const hours = Math.floor(minutes / 60);
  if (hours < 24) return minutes % 60 ? `${hours} h ${minutes % 60} min` : `${hours} h`;
  const days = Math.floor(hours / 24);
  return hours % 24 ? `${days} d ${hours % 24} h` : `${days} d`;
}

/** Days until the reorder level (or another level: say what "now" means) as the screens say it. */
export function formatDaysToReorder(days: number | null | undefined, nowText = "reorder now"): string {
  if (days == null || !Number.isFinite(days)) return "no fall in level";
  if (days <= 0) return nowText;
  if (days < 1) return "within a day";
  const whole = Math.floor(days);
  return `in ${whole} ${whole === 1 ? "day" : "days"}`;
}
