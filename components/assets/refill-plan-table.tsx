"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import type { RefillPlanJson } from "@/lib/read-models/refill-plan";
import { MAX_HORIZON_DAYS } from "@/lib/validations/export";
import { createColumnHelper } from "@tanstack/react-table";
import { formatDaysToReorder } from "@/components/fleet/fleet-figures";
import { Figure } from "@/components/ui/display-settings";
import { RelativeTime } from "@/components/ui/site-time";
import { PURPOSE_NAMES, TankPlanVerdict } from "@/components/assets/tank-plan";
import { DataTable } from "@/components/ui/data-table";

export const HORIZON_CHOICES = [3, 7, 14, 30, 60, MAX_HORIZON_DAYS] as const;
const DEFAULT_HORIZON = 14;

function horizonFrom(value: string | null): number {
  const n = Number(value);
  return (HORIZON_CHOICES as readonly number[]).includes(n) ? n : DEFAULT_HORIZON;
}

type PlanRow = RefillPlanJson["items"][number];
const column = createColumnHelper<PlanRow>();
const ACTION_WORDS = { deliver: "Deliver", pump_out: "Pump out", top_up: "Top up" } as const;
const columns = [
  column.display({ id: "due", header: "Due", cell: (c) => <TankPlanVerdict plan={c.row.original} zone={c.row.original.site_time_zone} /> }),
  column.accessor("asset_name", {
    header: "Tank",
    cell: (c) => (
      <>
        <Link href={`/assets/${c.row.original.asset_id}`} className="underline">{c.getValue()}</Link>
        <span className="block text-xs text-muted">{PURPOSE_NAMES[c.row.original.purpose]}</span>
      </>
    ),
  }),
  column.accessor("site_name", { header: "Site" }),
  column.accessor("fill_pct", { header: "Fill now", cell: (c) => <Figure kind="percent" value={c.getValue()} />, meta: { cellClassName: "figures" } }),
  column.accessor("current_volume_l", { header: "Volume now", cell: (c) => <Figure kind="volume" value={c.getValue()} />, meta: { cellClassName: "figures" } }),
  column.accessor("volume_l", {
    header: "To move",
    meta: { cellClassName: "figures" },
    cell: ({ row: { original: r } }) =>
      r.status === "needs_check" || r.action === null ? (
        <span className="font-sans text-muted">not planned until checked</span>
      ) : r.volume_l === null ? (
        <span className="font-sans text-muted">{r.action === "deliver" ? "no safe fill set" : "—"}</span>
      ) : (
        <>
          <span className="font-sans">{ACTION_WORDS[r.action]} </span>
          <Figure kind="volume" value={r.volume_l} />
          {r.action === "deliver" && r.safe_fill_pct !== null && <span className="font-sans text-xs text-muted"> to <Figure kind="percent" value={r.safe_fill_pct} /></span>}
        </>
      ),
  }),
  column.accessor("days_to_limit", {
    header: "Empty / overflow",
    meta: { cellClassName: "figures" },
    cell: ({ row: { original: r } }) => (r.days_to_limit === null ? "—" : `${r.purpose === "sump" ? "overflows" : "empty"} ${formatDaysToReorder(r.days_to_limit)}`),
  }),
  column.accessor("measured_at", { header: "Measured", cell: (c) => (c.getValue() ? <RelativeTime at={c.getValue()!} /> : "never") }),
];

/** Tanks the plan cannot schedule yet, with why (a forecast needs a long, steady history). */
function Unplanned({ rows }: { rows: RefillPlanJson["unplanned"] }) {
  if (rows.length === 0) return null;
  return (
    <section aria-labelledby="refill-unplanned" className="card p-4">
      <h2 id="refill-unplanned" className="mb-2 text-base font-bold">Not forecast yet</h2>
      <ul className="space-y-1 text-sm">
        {rows.map((r) => (
          <li key={r.asset_id}>
            <Link href={`/assets/${r.asset_id}`} className="underline">{r.asset_name}</Link> <span className="text-muted">({r.site_name}, {PURPOSE_NAMES[r.purpose].toLowerCase()})</span>: {r.reason}
          </li>
        ))}
      </ul>
    </section>
  );
}

/**
 * The refill plan for a horizon kept in the URL: read-only for every role (a delivery partner plans
 * from it); the only thing offered is the CSV download.
 */
export function RefillPlanTable({ canExport }: { canExport: boolean }) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const horizon = horizonFrom(params.get("horizon_days"));
  const { data, error, isLoading, mutate } = useSWR<RefillPlanJson>(`/api/refill-plan?horizon_days=${horizon}`, swrFetcher, { refreshInterval: 60000 });

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="refill-horizon" className="label">Horizon</label>
          <select
            id="refill-horizon"
            className="field w-auto"
            value={horizon}
            onChange={(e) => router.replace(`${pathname}?horizon_days=${e.target.value}`, { scroll: false })}
          >
            {HORIZON_CHOICES.map((d) => <option key={d} value={d}>the next {d} days</option>)}
          </select>
        </div>
        {canExport && (
          <a href={`/api/exports/refill-plan?horizon_days=${horizon}`} download className="btn-quiet">
            Download CSV
          </a>
        )}
      </div>
      <DataTable
        data={data?.items}
        columns={columns}
        getRowId={(r) => r.asset_id}
        label="Refill plan"
        sortable={false}
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty={`No tank needs a delivery, a pump-out or a top-up in the next ${horizon} days, and none needs a check.`}
      />
      {data && <Unplanned rows={data.unplanned} />}
      {data && (
        <p className="text-xs text-muted">
          Supply tanks: deliver capacity × safe fill − volume now, by the reorder date. Sumps: pump out down to their pumped-down level before the pump-out level. Reserves
          are kept full and listed when below their minimum; process tanks have alarms only. A forecast needs 48 h of steady level history since the last refill; a tank
          with a sensor fault or no recent value needs a check before it is scheduled.
        </p>
      )}
    </div>
  );
}
