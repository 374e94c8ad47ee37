"use client";

import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useState } from "react";

// The trend's period: the last day, week or 30 days, or a range of one's own; all of it in the URL
// (?range=7d, or ?from=…&to=… for a range) so a link shows the same trend.

export const RANGES = [
  { key: "1d", label: "1 day", days: 1 },
  { key: "7d", label: "7 days", days: 7 },
  { key: "30d", label: "30 days", days: 30 },
] as const;
export type RangeKey = (typeof RANGES)[number]["key"];

export type Period = { kind: "relative"; key: RangeKey; days: number } | { kind: "custom"; fromMs: number; toMs: number };

const DAY_MS = 86_400_000;
// The radio itself is hidden; its label shows the keyboard focus.
const FOCUS_WITHIN = "has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-ink";

/** The period the URL asks for; a malformed or reversed custom range falls back to the last day. */
export function periodFromParams(params: URLSearchParams): Period {
  const from = Date.parse(params.get("from") ?? "");
  const to = Date.parse(params.get("to") ?? "");
  if (Number.isFinite(from) && Number.isFinite(to) && from < to) return { kind: "custom", fromMs: from, toMs: to };
  const r = RANGES.find((x) => x.key === params.get("range")) ?? RANGES[0];
  return { kind: "relative", key: r.key, days: r.days };
}

/** Its window at a moment: a relative period ends now. */
export function windowOf(p: Period, now = Date.now()): { fromMs: number; toMs: number } {
  return p.kind === "custom" ? { fromMs: p.fromMs, toMs: p.toMs } : { fromMs: now - p.days * DAY_MS, toMs: now };
}

// datetime-local works in the browser's time zone without one written; convert at the edges.
function toLocalInput(ms: number): string {
  const d = new Date(ms - new Date(ms).getTimezoneOffset() * 60_000);
  return d.toISOString().slice(0, 16);
}

export function RangePicker({ period }: { period: Period }) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const window = windowOf(period);
  const [custom, setCustom] = useState(period.kind === "custom");
  const [from, setFrom] = useState(toLocalInput(window.fromMs));
  const [to, setTo] = useState(toLocalInput(window.toMs));
  const [problem, setProblem] = useState<string | null>(null);

  function go(next: URLSearchParams) {
    router.replace(`${pathname}?${next.toString()}`, { scroll: false });
  }

  function chooseRange(key: RangeKey) {
    setCustom(false);
    setProblem(null);
    const next = new URLSearchParams(params.toString());
    next.delete("from");
    next.delete("to");
    next.set("range", key);
    go(next);
  }

  function applyCustom(event: React.FormEvent) {
    event.preventDefault();
    const f = new Date(from).getTime();
    const t = new Date(to).getTime();
    if (!Number.isFinite(f) || !Number.isFinite(t)) return setProblem("Enter both a start and an end.");
    if (f >= t) return setProblem("The end must come after the start.");
    if (t - f > 366 * DAY_MS) return setProblem("A range spans at most 366 days.");
    setProblem(null);
    const next = new URLSearchParams(params.toString());
    next.delete("range");
    next.set("from", new Date(f).toISOString());
    next.set("to", new Date(t).toISOString());
    go(next);
  }

  const selected = custom ? "custom" : period.kind === "relative" ? period.key : "custom";
  return (
    <div className="flex flex-wrap items-end gap-3">
      <fieldset className="flex flex-wrap gap-1">
        <legend className="label">Period</legend>
        {RANGES.map((r) => (
          <label key={r.key} className={`btn-quiet md:h-9 cursor-pointer ${FOCUS_WITHIN} ${selected === r.key ? "border-ink font-bold" : ""}`}>
            <input type="radio" name="trend-range" className="sr-only" checked={selected === r.key} onChange={() => chooseRange(r.key)} />
            {r.label}
          </label>
        ))}
        <label className={`btn-quiet md:h-9 cursor-pointer ${FOCUS_WITHIN} ${selected === "custom" ? "border-ink font-bold" : ""}`}>
          <input type="radio" name="trend-range" className="sr-only" checked={selected === "custom"} onChange={() => setCustom(true)} />
          Range…
        </label>
      </fieldset>
      {selected === "custom" && (
        <form onSubmit={applyCustom} className="flex flex-wrap items-end gap-2" aria-describedby={problem ? "range-problem" : undefined}>
          <div>
            <label htmlFor="range-from" className="label">From</label>
            <input id="range-from" type="datetime-local" className="field h-9 py-1" value={from} onChange={(e) => setFrom(e.target.value)} />
          </div>
          <div>
            <label htmlFor="range-to" className="label">To</label>
            <input id="range-to" type="datetime-local" className="field h-9 py-1" value={to} onChange={(e) => setTo(e.target.value)} />
          </div>
          <button type="submit" className="btn md:h-9">Show range</button>
          {problem && <p id="range-problem" role="alert" className="field-error w-full">{problem}</p>}
        </form>
      )}
    </div>
  );
}
