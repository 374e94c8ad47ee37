"use client";

import Link from "next/link";
import useSWR from "swr";
import { createColumnHelper } from "@tanstack/react-table";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import { ASSET_KINDS, assetListQuerySchema } from "@/lib/validations/asset";
import type { AssetJson } from "@/lib/services/assets";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { DataTable } from "@/components/ui/data-table";
import { useListParams } from "@/components/ui/list-params";
import { ClearFilters } from "@/components/ui/clear-filters";
import { SiteFilter, useSites } from "@/components/ui/site-filter";

const FILTERS = ["site_id", "kind"] as const;
const column = createColumnHelper<AssetJson>();

function describeAsset(a: AssetJson, fig: Figures): string {
  if (a.kind === "tank") return [a.geometry?.shape.replace("_", " "), a.mount_height_m != null && `sensor at ${fig.length(a.mount_height_m)}`].filter(Boolean).join(", ");
  if (a.kind === "bay") {
    const place = [a.bay_level, a.bay_row != null && `row ${a.bay_row}`, a.bay_col != null && `column ${a.bay_col}`].filter(Boolean).join(" ");
    return `floor ${fig.length(a.floor_distance_m)}, occupied below ${fig.length(a.occupied_below_m)}${place ? `; ${place}` : ""}`;
  }
  return "distance point";
}

/** Assets filtered by site and kind; the filters live in the URL so a filtered list can be shared. */
export function AssetTable({ role }: { role: Role }) {
  const list = useListParams(assetListQuerySchema, FILTERS, FILTERS);
  const { site_id: siteId = "", kind = "" } = list.values;
  const query = new URLSearchParams(list.values as Record<string, string>).toString();

  const sites = useSites();
  const { data, error, isLoading, mutate } = useSWR<{ items: AssetJson[] }>(`/api/assets${query ? `?${query}` : ""}`, swrFetcher);
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "…";
  const manage = can(role, "asset:manage");
  const fig = useFigures();

  const columns = [
    column.accessor("name", { header: "Name", cell: (c) => <Link href={`/assets/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link> }),
    column.accessor("kind", { header: "Kind" }),
    column.accessor((a) => siteName(a.site_id), { id: "site", header: "Site" }),
    column.accessor("capacity_l", { header: "Capacity", cell: (c) => fig.volume(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor("tank_height_m", { header: "Height", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor("safe_fill_pct", { header: "Safe fill", cell: (c) => fig.percent(c.getValue()), meta: { cellClassName: "figures" } }),
    column.display({ id: "details", header: "Details", cell: (c) => describeAsset(c.row.original, fig), meta: { cellClassName: "text-muted" } }),
    ...(manage
      ? [column.display({ id: "actions", header: () => <span className="sr-only">Actions</span>, cell: (c) => <Link className="btn-quiet" href={`/assets/${c.row.original.id}/edit`} aria-label={`Edit ${c.row.original.name}`}>Edit</Link>, meta: { cellClassName: "text-right" } })]
      : []),
  ];

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap gap-4" role="group" aria-label="Filters">
        <SiteFilter id="asset-filter-site" className="field" value={siteId} onChange={(v) => list.set({ site_id: v })} />
        <div>
          <label htmlFor="asset-filter-kind" className="label">Kind</label>
          <select id="asset-filter-kind" className="field" value={kind} onChange={(e) => list.set({ kind: e.target.value })}>
            <option value="">All kinds</option>
            {ASSET_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
          </select>
        </div>
        <ClearFilters filtered={list.filtered} onClear={list.clearFilters} />
      </div>
      <DataTable data={data?.items} columns={columns} getRowId={(a) => a.id} label="Assets" loading={isLoading} error={error} retry={() => mutate()} empty="No assets match these filters." />
    </div>
  );
}
