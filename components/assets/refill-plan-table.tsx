"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import type { RefillPlanJson } from "@/lib/read-models/refill-plan";
import { MAX_HORIZON_DAYS } from "@/lib/validations/export";
import { createColumnHelper } from "@tanstack/react-table";
import { formatAge, formatDaysToReorder } from "@/components/fleet/fleet-figures";
import { Figure } from "@/components/ui/display-settings";
import { SiteTime } from "@/components/ui/site-time";
import { DataTable } from "@/components/ui/data-table";

export const HORIZON_CHOICES = [3, 7, 14, 30, 60, MAX_HORIZON_DAYS] as const;
const DEFAULT_HORIZON = 14;

function horizonFrom(value: string | null): number {
  const n = Number(value);
  return (HORIZON_CHOICES as readonly number[]).includes(n) ? n : DEFAULT_HORIZON;
}

function DueText({ row }: { row: RefillPlanJson["items"][number] }) {
  if (row.reason === "below_reorder") return "now: below the reorder level";
  const when = row.days_to_reorder <= 0 ? "now, by the forecast" : formatDaysToReorder(row.days_to_reorder);
  return (
    <>
      {when} (<SiteTime at={row.due_at} zone={row.site_time_zone} show="date" />)
    </>
  );
}

type PlanRow = RefillPlanJson["items"][number];
const column = createColumnHelper<PlanRow>();
const columns = [
  column.accessor((r) => new Date(r.due_at).getTime(), { id: "due", header: "Due", cell: (c) => <span className={c.row.original.reason === "below_reorder" ? "font-bold" : undefined}><DueText row={c.row.original} /></span> }),
  column.accessor("asset_name", { header: "Tank", cell: (c) => <Link href={`/assets/${c.row.original.asset_id}`} className="underline">{c.getValue()}</Link> }),
  column.accessor("site_name", { header: "Site" }),
  column.accessor("fill_pct", { header: "Fill now", cell: (c) => <Figure kind="percent" value={c.getValue()} />, meta: { cellClassName: "figures" } }),
  column.accessor("current_volume_l", { header: "Volume now", cell: (c) => <Figure kind="volume" value={c.getValue()} />, meta: { cellClassName: "figures" } }),
  column.accessor("deliver_l", {
    header: "Deliver to safe fill",
    meta: { cellClassName: "figures" },
    cell: ({ row: { original: r } }) => (
      <>
        {r.deliver_l === null ? <span className="font-sans text-muted">{r.safe_fill_pct === null ? "no safe fill set" : "no volume yet"}</span> : <Figure kind="volume" value={r.deliver_l} />}
        {r.safe_fill_pct !== null && <span className="font-sans text-xs text-muted"> to <Figure kind="percent" value={r.safe_fill_pct} /></span>}
      </>
    ),
  }),
  column.accessor("days_to_empty", { header: "Empty in", cell: (c) => (c.getValue() == null ? "—" : `${c.getValue()!.toFixed(1)}\u00a0d`), meta: { cellClassName: "figures" } }),
  column.accessor("measured_at", { header: "Measured", cell: (c) => (c.getValue() ? formatAge(c.getValue()!) : "never") }),
];

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
        empty={`No tank reaches its reorder level in the next ${horizon} days.`}
      />
      {data && <p className="text-xs text-muted">Volume to deliver = capacity × safe fill − volume now. Forecasts follow each tank&apos;s recent consumption, with refills left out.</p>}
    </div>
  );
}
