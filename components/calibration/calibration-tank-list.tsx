"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import { isUuid } from "@/lib/validations/common";
import type { AssetJson } from "@/lib/services/assets";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { useFigures } from "@/components/ui/display-settings";
import { STACKED_TABLE } from "@/components/ui/form-fields";

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
      <section className="card overflow-x-auto" aria-label="Tanks">
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No tanks here.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <thead>
              <tr>
                <th scope="col">Tank</th>
                <th scope="col">Site</th>
                <th scope="col">Sensor height</th>
                <th scope="col">Tank height</th>
              </tr>
            </thead>
            <tbody>
              {data.items.map((a) => (
                <tr key={a.id}>
                  <td data-label="Tank">
                    <Link href={`/calibration/${a.id}`} className="font-bold underline">{a.name}</Link>
                  </td>
                  <td data-label="Site">{siteName(a.site_id)}</td>
                  <td data-label="Sensor height" className="figures">{fig.length(a.mount_height_m)}</td>
                  <td data-label="Tank height" className="figures">{fig.length(a.tank_height_m)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
