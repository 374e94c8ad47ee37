"use client";

import useSWR from "swr";
import { createColumnHelper } from "@tanstack/react-table";
import { swrFetcher } from "@/lib/fetcher";
import type { UncertaintyBudgetJson } from "@/lib/read-models/uncertainty-budget";
import { roundUncertainty } from "@/lib/format/precision";
import { formatNumber } from "@/lib/format/number";
import { DataTable } from "@/components/ui/data-table";
import { SiteTime, useTimeDisplay } from "@/components/ui/site-time";

type Component = NonNullable<UncertaintyBudgetJson["budget"]>["components"][number];
const column = createColumnHelper<Component>();

/** A budget figure to two significant digits (GUM 7.2.6: enough for the parts to be compared and combined). */
function twoDigits(value: number, scale: number, unit: string, locale: string): string {
  if (!(value > 0)) return `0\u00a0${unit}`;
  const r = roundUncertainty(value * scale, { significantDigits: 2 });
  return `${formatNumber(r.value, r.decimals, locale)}\u00a0${unit}`;
}

/** What the latest distance's "±" is made of: each contribution, the combined and the expanded uncertainty (k = 2). */
export function UncertaintyBudgetTable({ assetId, zone }: { assetId: string; zone: string }) {
  const { data, error, isLoading, mutate } = useSWR<UncertaintyBudgetJson>(`/api/assets/${assetId}/uncertainty`, swrFetcher);
  const { locale } = useTimeDisplay(zone);
  const mm = (m: number) => twoDigits(m, 1000, "mm", locale);
  const columns = [
    column.accessor("name", { header: "Contribution", cell: (c) => <>{c.getValue()}{c.row.original.is_default && <span className="text-muted"> (default)</span>}</> }),
    column.accessor("type", { header: "Type", meta: { cellClassName: "figures" } }),
    column.accessor("standard_uncertainty", {
      header: () => <span className="normal-case">u(xᵢ)</span>,
      meta: { label: "Standard uncertainty of the input", cellClassName: "figures" },
      cell: (c) => (c.row.original.unit === "m" ? mm(c.getValue()) : twoDigits(c.getValue(), 1, c.row.original.unit, locale)),
    }),
    column.accessor("contribution_m", { header: () => <span className="normal-case">|cᵢ|·u(xᵢ)</span>, meta: { label: "Contribution to the distance", cellClassName: "figures" }, cell: (c) => mm(c.getValue()) }),
    column.accessor("variance_share", { header: "Share", meta: { cellClassName: "figures" }, cell: (c) => `${formatNumber(c.getValue() * 100, 0, locale)}\u00a0%` }),
    column.accessor("source", { header: "From", enableSorting: false }),
  ];
  const budget = data?.budget;
  return (
    <section aria-labelledby="budget-title" className="space-y-2" data-testid="uncertainty-budget">
      <h2 id="budget-title" className="text-lg font-bold">How sure is the latest distance?</h2>
      {data && !budget && <p className="text-sm text-muted">No valid distance measured yet on {data.channel.label}.</p>}
      {data?.measurement && (
        <p className="text-sm text-muted">
          {data.channel.label}, measured <SiteTime at={data.measurement.at} zone={zone} />. Budget after the {budget?.reference}; inputs independent,
          u<sub>c</sub>² = Σ (cᵢ·u(xᵢ))².
        </p>
      )}
      <DataTable
        data={budget?.components}
        columns={columns}
        getRowId={(c) => c.part}
        initialSorting={[{ id: "contribution_m", desc: true }]}
        label="Uncertainty budget"
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty="No budget until a distance is measured."
      />
      {budget && (
        <p className="figures text-sm">
          Combined standard uncertainty u<sub>c</sub> = {mm(budget.combined_m)}; expanded U = k·u<sub>c</sub> = {mm(budget.expanded_m)} with k = {budget.coverage_factor} (about 95 %).
        </p>
      )}
    </section>
  );
}
