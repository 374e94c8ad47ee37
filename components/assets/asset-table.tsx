"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import { isUuid } from "@/lib/validations/common";
import type { AssetJson } from "@/lib/db/queries/assets";
import type { SiteJson } from "@/lib/db/queries/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { formatLitres, formatMetres, formatPercent } from "@/components/fleet/fleet-figures";
import { STACKED_TABLE } from "@/components/ui/form-fields";

export const ASSET_KINDS = ["tank", "bay", "point"] as const;

function describeAsset(a: AssetJson): string {
  if (a.kind === "tank") return [a.geometry?.shape.replace("_", " "), a.mount_height_m != null && `sensor at ${formatMetres(a.mount_height_m)}`].filter(Boolean).join(", ");
  if (a.kind === "bay") {
    const place = [a.bay_level, a.bay_row != null && `row ${a.bay_row}`, a.bay_col != null && `column ${a.bay_col}`].filter(Boolean).join(" ");
    return `floor ${formatMetres(a.floor_distance_m)}, occupied below ${formatMetres(a.occupied_below_m)}${place ? `; ${place}` : ""}`;
  }
  return "distance point";
}

/** Assets filtered by site and kind; the filters live in the URL so a filtered list can be shared. */
export function AssetTable({ role }: { role: Role }) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const siteId = isUuid(params.get("site_id") ?? "") ? params.get("site_id")! : "";
  const kind = (ASSET_KINDS as readonly string[]).includes(params.get("kind") ?? "") ? params.get("kind")! : "";
  const filter = new URLSearchParams();
  if (siteId) filter.set("site_id", siteId);
  if (kind) filter.set("kind", kind);
  const query = filter.toString();

  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const { data, error, isLoading, mutate } = useSWR<{ items: AssetJson[] }>(`/api/assets${query ? `?${query}` : ""}`, swrFetcher);
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "…";
  const manage = can(role, "asset:manage");

  function setFilter(key: "site_id" | "kind", value: string) {
    const next = new URLSearchParams(params.toString());
    if (value) next.set(key, value);
    else next.delete(key);
    const qs = next.toString();
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap gap-4" role="group" aria-label="Filters">
        <div>
          <label htmlFor="asset-filter-site" className="label">Site</label>
          <select id="asset-filter-site" className="field" value={siteId} onChange={(e) => setFilter("site_id", e.target.value)}>
            <option value="">All sites</option>
            {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="asset-filter-kind" className="label">Kind</label>
          <select id="asset-filter-kind" className="field" value={kind} onChange={(e) => setFilter("kind", e.target.value)}>
            <option value="">All kinds</option>
            {ASSET_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
          </select>
        </div>
      </div>
      <section className="card overflow-x-auto" aria-label="Assets">
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No assets match these filters.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <thead>
              <tr>
                <th scope="col">Name</th>
                <th scope="col">Kind</th>
                <th scope="col">Site</th>
                <th scope="col">Capacity</th>
                <th scope="col">Height</th>
                <th scope="col">Safe fill</th>
                <th scope="col">Details</th>
                {manage && <th scope="col"><span className="sr-only">Actions</span></th>}
              </tr>
            </thead>
            <tbody>
              {data.items.map((a) => (
                <tr key={a.id}>
                  <td data-label="Name" className="font-bold">{a.name}</td>
                  <td data-label="Kind">{a.kind}</td>
                  <td data-label="Site">{siteName(a.site_id)}</td>
                  <td data-label="Capacity" className="figures">{formatLitres(a.capacity_l)}</td>
                  <td data-label="Height" className="figures">{formatMetres(a.tank_height_m)}</td>
                  <td data-label="Safe fill" className="figures">{formatPercent(a.safe_fill_pct)}</td>
                  <td data-label="Details" className="text-muted">{describeAsset(a)}</td>
                  {manage && (
                    <td data-label="" className="text-right">
                      <Link className="btn-quiet h-8" href={`/assets/${a.id}/edit`} aria-label={`Edit ${a.name}`}>Edit</Link>
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
