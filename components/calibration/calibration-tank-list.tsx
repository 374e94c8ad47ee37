"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import { isUuid } from "@/lib/validations/common";
import type { AssetJson } from "@/lib/services/assets";
import type { SiteJson } from "@/lib/services/sites";
import { createColumnHelper } from "@tanstack/react-table";
import { useFigures } from "@/components/ui/display-settings";
import { DataTable } from "@/components/ui/data-table";

const column = createColumnHelper<AssetJson>();

/** The tanks a technician can dip and calibrate, filtered by site (kept in the URL). */
export function CalibrationTankList() {
  const fig = useFigures();
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const siteId = isUuid(params.get("site_id") ?? "") ? params.get("site_id")! : "";
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const { data, error, isLoading, mutate } = useSWR<{ items: AssetJson[] }>(`/api/assets?kind=tank${siteId ? `&site_id=${siteId}` : ""}`, swrFetcher);
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "…";

  return (
    <div className="space-y-4">
      <div>
        <label htmlFor="calibration-filter-site" className="label">Site</label>
        <select
          id="calibration-filter-site"
          className="field w-auto"
          value={siteId}
          onChange={(e) => router.replace(e.target.value ? `${pathname}?site_id=${e.target.value}` : pathname, { scroll: false })}
        >
          <option value="">All sites</option>
          {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
        </select>
      </div>
      <DataTable
        data={data?.items}
        columns={[
          column.accessor("name", { header: "Tank", cell: (c) => <Link href={`/calibration/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link> }),
          column.accessor((a) => siteName(a.site_id), { id: "site", header: "Site" }),
          column.accessor("mount_height_m", { header: "Sensor height", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
          column.accessor("tank_height_m", { header: "Tank height", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
        ]}
        getRowId={(a) => a.id}
        initialSorting={[{ id: "name", desc: false }]}
        label="Tanks"
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty="No tanks here."
      />
    </div>
  );
}
