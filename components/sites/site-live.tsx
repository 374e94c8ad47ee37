"use client";

import Link from "next/link";
import useSWR from "swr";
import type { SiteOverviewJson } from "@/lib/read-models/overview-site";
import { swrFetcher } from "@/lib/fetcher";
import { BayPlan } from "@/components/sites/bay-plan";
import { Loading, LoadError } from "@/components/ui/data-state";
import { FleetAlarmList } from "@/components/alarms/fleet-alarm-list";
import { useFigures } from "@/components/ui/display-settings";
import { plural } from "@/lib/format/number";
import { LIVE_REFRESH_MS } from "@/components/fleet/fleet-overview";
import { FlagTag, OverdueAge, TankCaution } from "@/components/fleet/fleet-status";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";
import { SiteTime } from "@/components/ui/site-time";
import { TankCard } from "@/components/sites/site-live-tank";

// The site screen, in the order a person checks it: what is wrong (alarms), what it is now (tanks,
// bays, points), with each asset linking to its trend. Refreshed every 10 seconds.

type Point = SiteOverviewJson["points"][number];
const pointColumn = createColumnHelper<Point>();

function PointTable({ points, now }: { points: Point[]; now: number }) {
  const fig = useFigures();
  const columns = [
    pointColumn.accessor("name", { header: "Point", cell: (c) => <Link href={`/assets/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link> }),
    pointColumn.accessor((p) => p.latest?.distance_m ?? undefined, {
      id: "distance",
      header: "Distance",
      cell: ({ row: { original: p } }) => (
        <>
          {fig.length(p.latest?.distance_m, p.latest?.uncertainty_m)}
          <OverdueAge at={p.latest?.at} expectedIntervalS={p.channel?.expected_interval_s} now={now} />
        </>
      ),
      meta: { cellClassName: "figures" },
    }),
    pointColumn.display({ id: "day", header: "Last 24 h", cell: ({ row: { original: p } }) => (p.day.range ? `${fig.length(p.day.range[0])} to ${fig.length(p.day.range[1])}` : "—"), meta: { cellClassName: "figures" } }),
    pointColumn.accessor((p) => p.flags.length, {
      id: "sensor",
      header: "Sensor",
      cell: ({ row: { original: p } }) => (p.flags.length ? [...new Set(p.flags.map((f) => f.flag))].map((f) => <FlagTag key={f} flag={f} />) : <span className="text-muted">no fault</span>),
    }),
  ];
  return <DataTable data={points} columns={columns} getRowId={(p) => p.id} label="Distance points" title empty="No distance points at this site." />;
}

export function SiteLive({ siteId, canAcknowledge }: { siteId: string; canAcknowledge: boolean }) {
  const { data, error, isLoading, mutate } = useSWR<SiteOverviewJson>(`/api/sites/${siteId}/overview`, swrFetcher, { refreshInterval: LIVE_REFRESH_MS });
  if (isLoading) return <Loading label="Loading the site…" />;
  if (error && !data) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;
  const now = new Date(data.generated_at).getTime();
  const empty = !data.tanks.length && !data.bays.length && !data.points.length;
  return (
    <div className="space-y-6">
      {error && <LoadError error={error} retry={() => mutate()} />}
      <p className="flex flex-wrap gap-x-6 gap-y-1 text-sm" data-testid="site-facts">
        <span>
          <span className="figures">{data.tanks.length}</span> {plural(data.tanks.length, "tank")} · <span className="figures">{data.bays.length}</span> {plural(data.bays.length, "bay")} · <span className="figures">{data.points.length}</span> {plural(data.points.length, "point")}
        </span>
        <span className={data.devices.offline ? "font-bold text-high" : "text-muted"}>
          <span className="figures">{data.devices.offline}</span> of <span className="figures">{data.devices.total}</span> devices offline
        </span>
        <span className="text-muted">Time zone {data.site.time_zone}</span>
        <span className="text-muted">Live · as of <SiteTime at={data.generated_at} zone={data.site.time_zone} show="time" className="figures" /></span>
      </p>

      <section className="card" aria-labelledby="site-alarms">
        <h2 id="site-alarms" className="border-b border-rule px-3 py-2 text-lg font-bold">Alarms needing attention</h2>
        <FleetAlarmList alarms={data.alarms} canAcknowledge={canAcknowledge} onChanged={() => mutate()} alarmsHref={`/alarms?site_id=${siteId}`} limit={5} />
      </section>

      {data.tanks.length > 0 && (
        <section aria-labelledby="site-tanks" className="space-y-3">
          <h2 id="site-tanks" className="text-lg font-bold">Tanks</h2>
          <TankCaution />
          <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3">
            {data.tanks.map((t) => <TankCard key={t.id} tank={t} zone={data.site.time_zone} alarms={data.alarms} now={now} />)}
          </div>
        </section>
      )}

      {data.bays.length > 0 && (
        <section aria-labelledby="site-bays" className="card p-4">
          <h2 id="site-bays" className="mb-3 text-lg font-bold">Bays</h2>
          <BayPlan bays={data.bays} now={now} />
        </section>
      )}

      {data.points.length > 0 && <PointTable points={data.points} now={now} />}

      {empty && <p className="card px-4 py-6 text-sm text-muted">No assets at this site yet.</p>}
    </div>
  );
}
