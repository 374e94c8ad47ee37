"use client";

import Link from "next/link";
import { useState } from "react";
import type { AlarmJson } from "@/lib/services/alarms";
import { fetchJson } from "@/lib/fetcher";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { sinceText } from "@/components/fleet/fleet-status";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { SiteTime } from "@/components/ui/site-time";
import { alarmStateWord } from "@/lib/alarms/vocabulary";

// The alarm row of LOOK.md for the live screens: glyph and priority word, what and where in one line,
// the value against the setpoint, the state in words, the time since it began, and at the end the
// actions the role may take (acknowledge here; shelving, with its reason and expiry, on the alarms page).

// A health alarm's value has no unit (a count, a duration, a spread): its label and state say enough.
function valueText(a: AlarmJson, fig: Figures): string {
  if (!a.unit) return "";
  const fmt = (v: number) => (a.unit === "m" ? fig.length(v) : `${Number(v.toPrecision(4))}\u00a0${a.unit}`);
  if (a.value == null) return "—";
  if (a.setpoint == null) return fmt(a.value);
  return `${fmt(a.value)} against ${fmt(a.setpoint)}`;
}

const NEEDS_ACK = new Set(["unacknowledged", "returned_unacknowledged"]);
const PRIORITY_RANK: Record<string, number> = { critical: 0, high: 1, medium: 2, low: 3 };

/** Worst first: higher priority, then waiting for acknowledgement, then the oldest. */
function worstFirst(a: AlarmJson, b: AlarmJson): number {
  return (
    (PRIORITY_RANK[a.priority] ?? 4) - (PRIORITY_RANK[b.priority] ?? 4) ||
    Number(NEEDS_ACK.has(b.state)) - Number(NEEDS_ACK.has(a.state)) ||
    (a.activated_at ?? "").localeCompare(b.activated_at ?? "")
  );
}

export function FleetAlarmList({
  alarms,
  canAcknowledge,
  onChanged,
  showSite = false,
  alarmsHref,
  limit,
}: {
  alarms: AlarmJson[];
  /** Show only the worst few, with the count and a link to the rest (a car park's many bays). */
  limit?: number;
  canAcknowledge: boolean;
  onChanged: () => void;
  showSite?: boolean;
  alarmsHref: string;
}) {
  const [busy, setBusy] = useState<string | null>(null);
  const fig = useFigures();
  const [problem, setProblem] = useState<string | null>(null);

  async function acknowledge(id: string) {
    setBusy(id);
    setProblem(null);
    try {
      await fetchJson(`/api/alarms/${id}/acknowledge`, { method: "POST", body: "{}" });
      onChanged();
    } catch (e) {
      setProblem((e as Error).message);
    } finally {
      setBusy(null);
    }
  }

  if (!alarms.length) return <p className="px-3 py-4 text-sm text-muted">No alarm needs attention here.</p>;
  const shown = limit ? [...alarms].sort(worstFirst).slice(0, limit) : alarms;
  return (
    <div>
      {limit && (
        <p className="px-3 pt-2 text-sm" data-testid="alarm-count">
          <span className="figures font-bold">{alarms.length}</span> alarm{alarms.length === 1 ? "" : "s"} need{alarms.length === 1 ? "s" : ""} attention
          {shown.length < alarms.length && <>; the worst <span className="figures">{shown.length}</span> below</>}.
        </p>
      )}
      {problem && (
        <p role="alert" className="border-l-4 border-critical px-3 py-2 text-sm">
          Could not acknowledge: {problem}
        </p>
      )}
      <ul className="divide-y divide-rule">
        {shown.map((a) => (
          <li key={a.id} className="grid gap-1 px-3 py-2 text-sm md:flex md:min-h-10 md:items-center md:gap-4" data-testid="alarm-row">
            <span className="flex min-w-0 flex-wrap items-baseline gap-x-2 md:flex-1">
              <span className="md:w-24 md:shrink-0"><PriorityBadge priority={a.priority} /></span>
              <span className="min-w-0">
                <Link href={`/alarms/${a.id}`} className="font-bold underline">{a.label}</Link>
                {" · "}
                {a.asset ? <Link href={`/assets/${a.asset.id}`} className="underline">{a.asset.name}</Link> : a.channel?.device_name}
                {showSite && <span className="text-muted"> · {a.site.name}</span>}
              </span>
            </span>
            <span className="flex flex-wrap gap-x-3 md:shrink-0 md:flex-nowrap md:gap-x-4">
              {valueText(a, fig) && <span className="figures whitespace-nowrap">{valueText(a, fig)}</span>}
              <span className="whitespace-nowrap">{alarmStateWord(a.state)}</span>
              <span className="figures whitespace-nowrap text-muted">
                for {sinceText(a.activated_at)}{a.activated_at && <> · since <SiteTime at={a.activated_at} zone={a.site.time_zone} show="time" /></>}
              </span>
            </span>
            {canAcknowledge && NEEDS_ACK.has(a.state) && (
              <button type="button" className="btn-quiet justify-self-start md:h-8 md:shrink-0" disabled={busy === a.id} onClick={() => acknowledge(a.id)} aria-label={`Acknowledge ${a.label} on ${a.asset?.name ?? a.site.name}`}>
                {busy === a.id ? "Acknowledging…" : "Acknowledge"}
              </button>
            )}
          </li>
        ))}
      </ul>
      <p className="px-3 py-2 text-sm">
        <Link href={alarmsHref} className="inline-flex min-h-11 items-center underline md:min-h-0">
          {shown.length < alarms.length ? `All ${alarms.length} alarms of this site, with shelving, in the alarms table` : "All alarms here, with shelving, in the alarms table"}
        </Link>
      </p>
    </div>
  );
}
