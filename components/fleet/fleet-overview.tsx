"use client";

import Link from "next/link";
import useSWR from "swr";
import type { FleetOverviewJson } from "@/lib/read-models/overview";
import { swrFetcher } from "@/lib/fetcher";
import { Loading, LoadError } from "@/components/ui/data-state";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { plural } from "@/lib/format/number";
import { AlarmCounts, FlagTag, OverdueAge, PRIORITIES, TankCaution } from "@/components/fleet/fleet-status";
import { TankPlanVerdict } from "@/components/assets/tank-plan";
import { SiteTime } from "@/components/ui/site-time";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";

// The fleet overview: every site with its tanks' level, fill and volume, its bays occupied and free,
// its alarms needing attention by priority and its devices offline, refreshed every 10 seconds.
// Sites that need attention come first.

export const LIVE_REFRESH_MS = 10_000;

type SiteSummary = FleetOverviewJson["sites"][number];
type TankSummary = SiteSummary["tanks"][number];

const PRIORITY_WEIGHT = { critical: 1000, high: 100, medium: 10, low: 1 } as const;

function attention(s: SiteSummary): number {
  return PRIORITIES.reduce((n, p) => n + s.alarms[p] * PRIORITY_WEIGHT[p], 0) * 10 + s.devices.offline + s.bays.faulty + s.points.faulty;
}

/** A thin bar for a fill, beside its figure (the bar repeats the number, never replaces it). */
function FillBar({ pct }: { pct: number | null }) {
  const width = pct == null ? 0 : Math.min(100, Math.max(0, pct));
  return (
    <span aria-hidden="true" className="inline-block h-2 w-16 overflow-hidden rounded-sm border border-rule bg-paper align-middle">
      <span className="block h-full bg-liquid" style={{ width: `${width}%` }} />
    </span>
  );
}

const tankColumn = createColumnHelper<TankSummary>();

function tankColumns(now: number, zone: string, fig: Figures) {
  return [
    tankColumn.accessor("name", {
      header: "Tank",
      cell: ({ row: { original: tank } }) => (
        <>
          <Link href={`/assets/${tank.id}`} className="font-bold underline">{tank.name}</Link>
          {tank.flags.length > 0 && <span className="ml-2 inline-flex gap-1">{[...new Set(tank.flags)].map((f) => <FlagTag key={f} flag={f} />)}</span>}
        </>
      ),
      meta: { headerClassName: "md:w-[34%]" },
    }),
    tankColumn.accessor((t) => t.fill_pct ?? undefined, {
      id: "fill",
      header: "Fill",
      cell: (c) => <><FillBar pct={c.row.original.fill_pct} /> {fig.percent(c.row.original.fill_pct)}</>,
      meta: { headerClassName: "md:w-[16%]", cellClassName: "figures whitespace-nowrap" },
    }),
    tankColumn.accessor((t) => t.volume_l ?? undefined, { id: "volume", header: "Volume", cell: (c) => fig.volume(c.row.original.volume_l), meta: { headerClassName: "md:w-[14%]", cellClassName: "figures whitespace-nowrap" } }),
    tankColumn.accessor((t) => t.level_m ?? undefined, {
      id: "level",
      header: "Level",
      cell: ({ row: { original: tank } }) => (
        <>
          {fig.length(tank.level_m, tank.uncertainty_m)}
          <OverdueAge at={tank.at} expectedIntervalS={tank.expected_interval_s} now={now} />
        </>
      ),
      meta: { headerClassName: "md:w-[22%]", cellClassName: "figures whitespace-nowrap" },
    }),
    tankColumn.display({
      id: "plan",
      header: "Plan",
      cell: (c) => <TankPlanVerdict plan={c.row.original.plan} zone={zone} />,
      meta: { headerClassName: "md:w-[14%]" },
    }),
  ];
}

function SiteCard({ site, now }: { site: SiteSummary; now: number }) {
  // The server sends every tank of a small site by name, and the emptiest of a large one.
  const tanks = site.tanks;
  const fig = useFigures();
  return (
    <section className="card" aria-labelledby={`site-${site.id}`} data-testid="site-card">
      <header className="flex flex-wrap items-baseline gap-x-4 gap-y-1 border-b border-rule px-4 py-3">
        <h2 id={`site-${site.id}`} className="text-lg font-bold">
          <Link href={`/sites/${site.id}`} className="underline-offset-2 hover:underline">{site.name}</Link>
        </h2>
        <span className="text-sm"><AlarmCounts counts={site.alarms} /></span>
        <span className="text-sm">
          {site.devices.offline > 0 ? (
            <span className="font-bold text-high"><span className="figures">{site.devices.offline}</span> of <span className="figures">{site.devices.total}</span> devices offline</span>
          ) : (
            <span className="text-muted"><span className="figures">{site.devices.total}</span> device{site.devices.total === 1 ? "" : "s"}, none offline</span>
          )}
        </span>
      </header>
      {tanks.length > 0 && (
        <DataTable data={tanks} columns={tankColumns(now, site.time_zone, fig)} getRowId={(t) => t.id} label={`Tanks at ${site.name}`} bare tableClassName="md:table-fixed" empty="No tanks." />
      )}
      {site.tank_count > site.tanks.length && (
        <p className="px-4 py-2 text-sm text-muted">
          The <span className="figures">{site.tanks.length}</span> emptiest of <span className="figures">{site.tank_count}</span> tanks; <Link href={`/sites/${site.id}`} className="underline">all of them on the site</Link>.
        </p>
      )}
      {(site.bays.total > 0 || site.points.total > 0 || site.tank_count === 0) && (
      <p className="flex flex-wrap gap-x-6 gap-y-1 px-4 py-3 text-sm">
        {site.bays.total > 0 && (
          <span data-testid="bay-summary">
            Bays: <span className="figures">{site.bays.occupied}</span> occupied · <span className="figures">{site.bays.free}</span> free
            {site.bays.faulty > 0 && <> · <span className="figures font-bold">{site.bays.faulty}</span> sensor fault{site.bays.faulty === 1 ? "" : "s"}</>}
            {site.bays.unknown > 0 && <> · <span className="figures">{site.bays.unknown}</span> without reading</>}
          </span>
        )}
        {site.points.total > 0 && (
          <span>
            Distance points: <span className="figures">{site.points.total}</span>
            {site.points.faulty > 0 && <> · <span className="figures font-bold">{site.points.faulty}</span> sensor fault{site.points.faulty === 1 ? "" : "s"}</>}
          </span>
        )}
        {site.tank_count === 0 && site.bays.total === 0 && site.points.total === 0 && <span className="text-muted">No assets at this site yet.</span>}
      </p>
      )}
    </section>
  );
}

export function FleetOverview() {
  const { data, error, isLoading, mutate } = useSWR<FleetOverviewJson>("/api/overview", swrFetcher, { refreshInterval: LIVE_REFRESH_MS });
  if (isLoading) return <Loading label="Loading the fleet…" />;
  if (error && !data) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;
  const now = new Date(data.generated_at).getTime();
  const t = data.totals;
  const sites = [...data.sites].sort((a, b) => attention(b) - attention(a) || a.name.localeCompare(b.name));
  return (
    <div className="space-y-4">
      {error && <LoadError error={error} retry={() => mutate()} />}
      <p className="flex flex-wrap gap-x-6 gap-y-1 text-sm" data-testid="fleet-totals">
        <span><span className="figures">{t.sites}</span> {plural(t.sites, "site")} · <span className="figures">{t.tanks}</span> {plural(t.tanks, "tank")} · <span className="figures">{t.bays}</span> {plural(t.bays, "bay")}, <span className="figures">{t.bays_occupied}</span> occupied</span>
        <span><AlarmCounts counts={t.alarms} /></span>
        <span className={t.devices_offline ? "font-bold text-high" : "text-muted"}>
          <span className="figures">{t.devices_offline}</span> of <span className="figures">{t.devices}</span> devices offline
        </span>
        <span className="text-muted">Live · as of <SiteTime at={data.generated_at} show="time" className="figures" /></span>
      </p>
      {sites.length === 0 && (
        <p className="card px-4 py-6 text-sm text-muted">No sites yet. An admin adds them under <Link href="/sites" className="underline">Sites</Link>.</p>
      )}
      {sites.map((s) => <SiteCard key={s.id} site={s} now={now} />)}
      {t.tanks > 0 && <TankCaution />}
    </div>
  );
}
