"use client";

// Times on screens: in the site's time zone by default, or the viewer's own zone when they choose
// "my time" (kept in localStorage). Every time is written by lib/format/time.ts, so it always carries
// its zone. The viewer's zone is only known in the browser: until the page has mounted, and for data
// without a site, the site's zone (or UTC) is used, so server and browser render the same text.

import { createContext, useCallback, useContext, useMemo, useSyncExternalStore } from "react";
import { formatDate, formatDateTime, formatRelative, formatTime, type HourCycle, type TimeDisplay } from "@/lib/format/time";

export type TimeView = "site" | "mine";

const STORAGE_KEY = "halftrip.time-view";
const DEFAULT_LOCALE = "en-GB";

interface TimeViewState {
  view: TimeView;
  viewerZone: string | null;
  locale: string;
  hourCycle?: HourCycle;
  setView: (v: TimeView) => void;
}

const TimeViewContext = createContext<TimeViewState>({ view: "site", viewerZone: null, locale: DEFAULT_LOCALE, setView: () => {} });

// The choice lives in localStorage; other tabs and this one hear of a change through the "storage" event.
const listeners = new Set<() => void>();
function subscribe(listener: () => void): () => void {
  listeners.add(listener);
  window.addEventListener("storage", listener);
  return () => {
    listeners.delete(listener);
    window.removeEventListener("storage", listener);
  };
}
const readView = (): TimeView => (window.localStorage.getItem(STORAGE_KEY) === "mine" ? "mine" : "site");
const readViewerZone = () => Intl.DateTimeFormat().resolvedOptions().timeZone;

export function TimeViewProvider({ locale = DEFAULT_LOCALE, hourCycle, children }: { locale?: string; hourCycle?: HourCycle; children: React.ReactNode }) {
  const view = useSyncExternalStore(subscribe, readView, () => "site" as const);
  const viewerZone = useSyncExternalStore(subscribe, readViewerZone, () => null);
  const setView = useCallback((v: TimeView) => {
    window.localStorage.setItem(STORAGE_KEY, v);
    for (const listener of listeners) listener();
  }, []);
  const value = useMemo(() => ({ view, viewerZone, locale, hourCycle, setView }), [view, viewerZone, locale, hourCycle, setView]);
  return <TimeViewContext.Provider value={value}>{children}</TimeViewContext.Provider>;
}

/** How to write a time of a site (or of no site: the viewer's zone once known, else UTC). */
export function useTimeDisplay(siteTimeZone?: string | null): TimeDisplay {
  const { view, viewerZone, locale, hourCycle } = useContext(TimeViewContext);
  const timeZone = (view === "mine" || !siteTimeZone ? viewerZone : siteTimeZone) ?? siteTimeZone ?? "UTC";
  return useMemo(() => ({ locale, timeZone, hourCycle }), [locale, timeZone, hourCycle]);
}

const FORMATS = { datetime: formatDateTime, date: formatDate, time: formatTime } as const;

/** A time in the site's zone (or the viewer's), labelled: "4 Dec 2026, 14:05 GMT". */
export function SiteTime({ at, zone, show = "datetime", className }: { at: string | Date | null | undefined; zone?: string | null; show?: keyof typeof FORMATS; className?: string }) {
  const display = useTimeDisplay(zone);
  if (at == null) return <span className={className}>—</span>;
  const date = new Date(at);
  return (
    <time dateTime={date.toISOString()} className={className} title={display.timeZone}>
      {FORMATS[show](date, display)}
    </time>
  );
}

/** "3 hours ago", with the labelled time as the tooltip. */
export function RelativeTime({ at, zone, now, className }: { at: string | Date; zone?: string | null; now?: Date; className?: string }) {
  const display = useTimeDisplay(zone);
  const date = new Date(at);
  return (
    <time dateTime={date.toISOString()} className={className} title={formatDateTime(date, display)}>
      {formatRelative(date, now ?? new Date(), display.locale)}
    </time>
  );
}

/** The viewer's choice between the site's clock and their own. */
export function TimeViewToggle() {
  const { view, setView } = useContext(TimeViewContext);
  return (
    <label className="flex items-center gap-1 text-muted">
      <span className="sr-only sm:not-sr-only">Times in</span>
      <select aria-label="Times in" value={view} onChange={(e) => setView(e.target.value as TimeView)} className="rounded border border-rule bg-card px-1 py-0.5 text-ink">
        <option value="site">site time</option>
        <option value="mine">my time</option>
      </select>
    </label>
  );
}
