"use client";

import Link from "next/link";
import useSWR from "swr";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import type { SiteJson } from "@/lib/db/queries/sites";
import type { AssetJson } from "@/lib/db/queries/assets";
import type { DeviceJson } from "@/lib/db/queries/devices";
import { Loading, LoadError } from "@/components/ui/data-state";
import { formatCelsius, formatPercent } from "@/components/fleet/fleet-figures";
import { STACKED_TABLE } from "@/components/ui/form-fields";

function countBySite(items: { site_id: string }[] | undefined): Map<string, number> {
  const counts = new Map<string, number>();
  for (const item of items ?? []) counts.set(item.site_id, (counts.get(item.site_id) ?? 0) + 1);
  return counts;
}

export function SiteTable({ role }: { role: Role }) {
  const { data, error, isLoading, mutate } = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  // Counts come from the two lists the other screens load anyway; no extra endpoint needed.
  const assets = useSWR<{ items: AssetJson[] }>("/api/assets", swrFetcher);
  const devices = useSWR<{ items: DeviceJson[] }>("/api/devices", swrFetcher);
  const assetCounts = countBySite(assets.data?.items);
  const deviceCounts = countBySite(devices.data?.items);
  const count = (counts: Map<string, number>, ready: boolean, id: string) => (ready ? String(counts.get(id) ?? 0) : "…");
  const manage = can(role, "site:manage");

  return (
    <section className="card overflow-x-auto" aria-label="Sites">
      {isLoading && <Loading />}
      {error && <LoadError error={error} retry={() => mutate()} />}
      {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No sites yet.{manage && " Add the first one."}</p>}
      {data && data.items.length > 0 && (
        <table className={STACKED_TABLE}>
          <thead>
            <tr>
              <th scope="col">Name</th>
              <th scope="col">Time zone</th>
              <th scope="col">Fallback air temperature</th>
              <th scope="col">Humidity</th>
              <th scope="col">Escalation delay</th>
              <th scope="col">Assets</th>
              <th scope="col">Devices</th>
              {manage && <th scope="col"><span className="sr-only">Actions</span></th>}
            </tr>
          </thead>
          <tbody>
            {data.items.map((s) => (
              <tr key={s.id}>
                <td data-label="Name" className="font-bold">{s.name}</td>
                <td data-label="Time zone">{s.time_zone}</td>
                <td data-label="Fallback air temperature" className="figures">{s.air_temp_c == null ? "none (20 °C)" : formatCelsius(s.air_temp_c)}</td>
                <td data-label="Humidity" className="figures">{formatPercent(s.humidity_pct)}</td>
                <td data-label="Escalation delay" className="figures">{s.escalation_delay_min} min</td>
                <td data-label="Assets" className="figures">
                  <Link className="underline" href={`/assets?site_id=${s.id}`}>{count(assetCounts, !!assets.data, s.id)}</Link>
                </td>
                <td data-label="Devices" className="figures">
                  <Link className="underline" href={`/devices?site_id=${s.id}`}>{count(deviceCounts, !!devices.data, s.id)}</Link>
                </td>
                {manage && (
                  <td data-label="" className="text-right">
                    <Link className="btn-quiet h-8" href={`/sites/${s.id}/edit`} aria-label={`Edit ${s.name}`}>Edit</Link>
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
