"use client";

import Link from "next/link";
import useSWR from "swr";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import { isUuid } from "@/lib/validations/common";
import type { DeviceJson } from "@/lib/db/queries/devices";
import type { SiteJson } from "@/lib/db/queries/sites";
import { Loading, LoadError } from "@/components/ui/data-state";
import { formatAge, formatDbm, formatVolts } from "@/components/fleet/fleet-figures";
import { STACKED_TABLE } from "@/components/ui/form-fields";

export const PROFILE_LABELS: Record<string, string> = { echo: "echo time", capture: "timer capture", pulse_coded: "pulse-coded", duty_coded: "duty-coded" };

/** Offline when nothing arrived for three expected intervals (the product's health rule). */
export function isOffline(d: Pick<DeviceJson, "last_seen_at" | "expected_interval_s">, now = Date.now()): boolean {
  return !!d.last_seen_at && now - new Date(d.last_seen_at).getTime() > 3 * d.expected_interval_s * 1000;
}

export function DeviceTable() {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const siteId = isUuid(params.get("site_id") ?? "") ? params.get("site_id")! : "";
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const { data, error, isLoading, mutate } = useSWR<{ items: DeviceJson[] }>(siteId ? `/api/devices?site_id=${siteId}` : "/api/devices", swrFetcher, { refreshInterval: 30000 });
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "…";

  function setSite(value: string) {
    router.replace(value ? `${pathname}?site_id=${value}` : pathname, { scroll: false });
  }

  return (
    <div className="space-y-4">
      <div>
        <label htmlFor="device-filter-site" className="label">Site</label>
        <select id="device-filter-site" className="field w-auto" value={siteId} onChange={(e) => setSite(e.target.value)}>
          <option value="">All sites</option>
          {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
        </select>
      </div>
      <section className="card overflow-x-auto" aria-label="Devices">
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No devices here yet.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <thead>
              <tr>
                <th scope="col">Name</th>
                <th scope="col">Serial</th>
                <th scope="col">Site</th>
                <th scope="col">Profile</th>
                <th scope="col">Channels</th>
                <th scope="col">Last seen</th>
                <th scope="col">Battery</th>
                <th scope="col">Signal</th>
              </tr>
            </thead>
            <tbody>
              {data.items.map((d) => (
                <tr key={d.id}>
                  <td data-label="Name"><Link href={`/devices/${d.id}`} className="font-bold underline">{d.name}</Link></td>
                  <td data-label="Serial" className="figures">{d.serial}</td>
                  <td data-label="Site">{siteName(d.site_id)}</td>
                  <td data-label="Profile">{PROFILE_LABELS[d.profile] ?? d.profile}</td>
                  <td data-label="Channels" className="figures">{d.channels.length}</td>
                  <td data-label="Last seen" className="figures">
                    {d.last_seen_at ? formatAge(d.last_seen_at) : "never"}
                    {isOffline(d) && <span className="font-sans"> · offline</span>}
                  </td>
                  <td data-label="Battery" className="figures">{formatVolts(d.battery_v)}</td>
                  <td data-label="Signal" className="figures">{formatDbm(d.rssi_dbm)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
