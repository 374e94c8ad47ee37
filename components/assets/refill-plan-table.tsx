"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import type { RefillPlanJson } from "@/lib/db/queries/refill-plan";
import { MAX_HORIZON_DAYS } from "@/lib/validations/export";
import { Loading, LoadError } from "@/components/ui/data-state";
import { formatAge, formatDaysToReorder, formatLitres, formatPercent } from "@/components/fleet/fleet-figures";
import { STACKED_TABLE } from "@/components/ui/form-fields";

export const HORIZON_CHOICES = [3, 7, 14, 30, 60, MAX_HORIZON_DAYS] as const;
const DEFAULT_HORIZON = 14;

function horizonFrom(value: string | null): number {
  const n = Number(value);
  return (HORIZON_CHOICES as readonly number[]).includes(n) ? n : DEFAULT_HORIZON;
}

function dueText(row: RefillPlanJson["items"][number]): string {
  if (row.reason === "below_reorder") return "now: below the reorder level";
  const when = row.days_to_reorder <= 0 ? "now, by the forecast" : formatDaysToReorder(row.days_to_reorder);
  return `${when} (${new Date(row.due_at).toLocaleDateString(undefined, { dateStyle: "medium" })})`;
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
      <section className="card overflow-x-auto" aria-label="Refill plan">
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No tank reaches its reorder level in the next {horizon} days.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <caption className="sr-only">Tanks to refill in the next {horizon} days, soonest first</caption>
            <thead>
              <tr>
                <th scope="col">Due</th>
                <th scope="col">Tank</th>
                <th scope="col">Site</th>
                <th scope="col">Fill now</th>
                <th scope="col">Volume now</th>
                <th scope="col">Deliver to safe fill</th>
                <th scope="col">Empty in</th>
                <th scope="col">Measured</th>
              </tr>
            </thead>
            <tbody>
              {data.items.map((r) => (
                <tr key={r.asset_id}>
                  <td data-label="Due" className={r.reason === "below_reorder" ? "font-bold" : undefined}>{dueText(r)}</td>
                  <td data-label="Tank"><Link href={`/assets/${r.asset_id}`} className="underline">{r.asset_name}</Link></td>
                  <td data-label="Site">{r.site_name}</td>
                  <td data-label="Fill now" className="figures">{formatPercent(r.fill_pct)}</td>
                  <td data-label="Volume now" className="figures">{formatLitres(r.current_volume_l)}</td>
                  <td data-label="Deliver to safe fill" className="figures">
                    {r.deliver_l === null ? <span className="font-sans text-muted">{r.safe_fill_pct === null ? "no safe fill set" : "no volume yet"}</span> : formatLitres(r.deliver_l)}
                    {r.safe_fill_pct !== null && <span className="font-sans text-xs text-muted"> to {formatPercent(r.safe_fill_pct)}</span>}
                  </td>
                  <td data-label="Empty in" className="figures">{r.days_to_empty == null ? "—" : `${r.days_to_empty.toFixed(1)}\u00a0d`}</td>
                  <td data-label="Measured">{r.measured_at ? formatAge(r.measured_at) : "never"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      {data && <p className="text-xs text-muted">Volume to deliver = capacity × safe fill − volume now. Forecasts follow each tank&apos;s recent consumption, with refills left out.</p>}
    </div>
  );
}
