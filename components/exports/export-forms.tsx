"use client";

import { useMemo, useState } from "react";
import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { AssetJson } from "@/lib/services/assets";
import { MAX_EXPORT_ASSETS, MAX_EXPORT_DAYS, rangeIssues } from "@/lib/validations/export";
import { Loading, LoadError } from "@/components/ui/data-state";
import { HORIZON_CHOICES } from "@/components/assets/refill-plan-table";
import { useDisplaySettings } from "@/components/ui/display-settings";
import type { UnitSystem } from "@/lib/units/units";
import { SiteFilter, useSites } from "@/components/ui/site-filter";

const UNIT_CHOICES: Record<UnitSystem, string> = { si: "SI: level_m, volume_l, air_temp_c", us: "US customary: level_ft, volume_gal, air_temp_f" };

/** Which units the files' figures are in; each column's name says its unit. */
function UnitsChoice({ units, setUnits }: { units: UnitSystem; setUnits: (u: UnitSystem) => void }) {
  return (
    <fieldset className="card flex flex-wrap gap-x-6 gap-y-2 p-4 text-sm lg:col-span-2">
      <legend className="label">Units of the files</legend>
      {(Object.keys(UNIT_CHOICES) as UnitSystem[]).map((u) => (
        <label key={u} className="flex items-center gap-2">
          <input type="radio" name="export-units" value={u} checked={units === u} onChange={() => setUnits(u)} />
          {UNIT_CHOICES[u]}
        </label>
      ))}
    </fieldset>
  );
}

const DAY_MS = 86_400_000;

function localDate(d: Date): string {
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

/** Local calendar days → the instants they span: from the start of `from` to the end of `to`. */
export function localDayRange(from: string, to: string): { from: Date; to: Date } | null {
  const start = new Date(`${from}T00:00`);
  const endDay = new Date(`${to}T00:00`);
  if (Number.isNaN(start.getTime()) || Number.isNaN(endDay.getTime())) return null;
  const end = new Date(endDay);
  end.setDate(end.getDate() + 1);
  return { from: start, to: end };
}

function RangeFields({ idPrefix, from, to, setFrom, setTo, message }: { idPrefix: string; from: string; to: string; setFrom: (v: string) => void; setTo: (v: string) => void; message: string | null }) {
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap gap-4">
        <div>
          <label htmlFor={`${idPrefix}-from`} className="label">From</label>
          <input id={`${idPrefix}-from`} type="date" className="field figures" value={from} onChange={(e) => setFrom(e.target.value)} aria-describedby={message ? `${idPrefix}-range-error` : undefined} />
        </div>
        <div>
          <label htmlFor={`${idPrefix}-to`} className="label">To (included)</label>
          <input id={`${idPrefix}-to`} type="date" className="field figures" value={to} onChange={(e) => setTo(e.target.value)} aria-invalid={message ? true : undefined} aria-describedby={message ? `${idPrefix}-range-error` : undefined} />
        </div>
      </div>
      {message && (
        <p id={`${idPrefix}-range-error`} role="alert" className="field-error">
          {message}
        </p>
      )}
    </div>
  );
}

function useRange(days: number) {
  const today = new Date();
  const [from, setFrom] = useState(() => localDate(new Date(today.getTime() - (days - 1) * DAY_MS)));
  const [to, setTo] = useState(() => localDate(today));
  const range = localDayRange(from, to);
  const message = !range ? "Choose both dates." : (rangeIssues(range)[0]?.message ?? null);
  const query = range && !message ? `from=${encodeURIComponent(range.from.toISOString())}&to=${encodeURIComponent(range.to.toISOString())}` : null;
  return { from, to, setFrom, setTo, message, query };
}

/** A download link once the choices are valid; until then a disabled button, with the reason beside it when the range does not already say it. */
function Download({ href, label, why }: { href: string | null; label: string; why: string | null }) {
  if (href) return <a href={href} download className="btn">{label}</a>;
  const id = `${label.replace(/\W+/g, "-").toLowerCase()}-why`;
  return (
    <div className="flex flex-wrap items-center gap-3">
      <button type="button" className="btn" disabled aria-describedby={why ? id : undefined}>
        {label}
      </button>
      {why && <p id={id} className="text-sm text-muted">{why}</p>}
    </div>
  );
}

function MeasurementsExport({ units }: { units: UnitSystem }) {
  const sites = useSites();
  const assets = useSWR<{ items: AssetJson[] }>("/api/assets", swrFetcher);
  const [siteId, setSiteId] = useState("");
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [fullPrecision, setFullPrecision] = useState(false);
  const range = useRange(7);
  const shown = useMemo(() => (assets.data?.items ?? []).filter((a) => !siteId || a.site_id === siteId), [assets.data, siteId]);
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "";
  const tooMany = chosen.size > MAX_EXPORT_ASSETS ? `Choose at most ${MAX_EXPORT_ASSETS} assets.` : null;
  const why = chosen.size === 0 ? "Choose at least one asset." : tooMany;
  const href = !why && range.query ? `/api/exports/measurements?asset_ids=${[...chosen].join(",")}&${range.query}${fullPrecision ? "&precision=full" : ""}&units=${units}` : null;

  function toggle(id: string) {
    setChosen((prev) => {
      const next = new Set(prev);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });
  }

  return (
    <section aria-labelledby="export-measurements" className="card space-y-4 p-4">
      <h2 id="export-measurements" className="text-lg font-bold">Measurements</h2>
      <p className="text-sm text-muted">Every measurement of the chosen assets: status, time of flight, air temperature, distance, level, volume, fill and uncertainty. Up to {MAX_EXPORT_DAYS} days at a time.</p>
      <SiteFilter id="export-site" value={siteId} onChange={(v) => setSiteId(v)} />
      <fieldset>
        <legend className="label">Assets ({chosen.size} chosen)</legend>
        {assets.isLoading && <Loading />}
        {assets.error && <LoadError error={assets.error} retry={() => assets.mutate()} />}
        <div className="max-h-64 space-y-1 overflow-y-auto rounded border border-rule p-2">
          {shown.map((a) => (
            <label key={a.id} className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={chosen.has(a.id)} onChange={() => toggle(a.id)} />
              <span>{a.name}</span>
              <span className="text-muted">· {a.kind} · {siteName(a.site_id)}</span>
            </label>
          ))}
          {assets.data && shown.length === 0 && <p className="text-sm text-muted">No assets here.</p>}
        </div>
        {tooMany && <p className="field-error">{tooMany}</p>}
      </fieldset>
      <RangeFields idPrefix="measurements" {...range} />
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" className="mt-1" checked={fullPrecision} onChange={(e) => setFullPrecision(e.target.checked)} />
        <span>
          Full precision
          <span className="block text-muted">By default each figure keeps only the digits its uncertainty supports. Full precision keeps every digit as computed, for your own analysis.</span>
        </span>
      </label>
      <Download href={href} label="Download measurements CSV" why={why} />
    </section>
  );
}

function AlarmsExport({ units }: { units: UnitSystem }) {
  const range = useRange(30);
  return (
    <section aria-labelledby="export-alarms" className="card space-y-4 p-4">
      <h2 id="export-alarms" className="text-lg font-bold">Alarm events</h2>
      <p className="text-sm text-muted">Every activation, acknowledgement, shelving, return to normal and notification in the range, with who and when.</p>
      <RangeFields idPrefix="alarms" {...range} />
      <Download href={range.query ? `/api/exports/alarms?${range.query}&units=${units}` : null} label="Download alarm events CSV" why={null} />
    </section>
  );
}

function RefillExport({ units }: { units: UnitSystem }) {
  const [horizon, setHorizon] = useState<number>(14);
  return (
    <section aria-labelledby="export-refill" className="card space-y-4 p-4">
      <h2 id="export-refill" className="text-lg font-bold">Refill plan</h2>
      <div>
        <label htmlFor="export-horizon" className="label">Horizon</label>
        <select id="export-horizon" className="field w-auto" value={horizon} onChange={(e) => setHorizon(Number(e.target.value))}>
          {HORIZON_CHOICES.map((d) => <option key={d} value={d}>the next {d} days</option>)}
        </select>
      </div>
      <Download href={`/api/exports/refill-plan?horizon_days=${horizon}&units=${units}`} label="Download refill plan CSV" why={null} />
    </section>
  );
}

export function ExportForms() {
  const [units, setUnits] = useState<UnitSystem>(useDisplaySettings().unit_system);
  return (
    <div className="grid gap-6 lg:grid-cols-2">
      <UnitsChoice units={units} setUnits={setUnits} />
      <MeasurementsExport units={units} />
      <div className="space-y-6">
        <AlarmsExport units={units} />
        <RefillExport units={units} />
      </div>
    </div>
  );
}
