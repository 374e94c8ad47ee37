"use client";

import { RelativeTime } from "@/components/ui/site-time";

import Link from "next/link";
import useSWR from "swr";
import { createColumnHelper } from "@tanstack/react-table";
import { swrFetcher } from "@/lib/fetcher";
import { deviceListQuerySchema } from "@/lib/validations/device";
import type { DeviceJson } from "@/lib/services/devices";
import { useFigures } from "@/components/ui/display-settings";
import { DataTable } from "@/components/ui/data-table";
import { useListParams } from "@/components/ui/list-params";
import { ClearFilters } from "@/components/ui/clear-filters";
import { SiteFilter, useSites } from "@/components/ui/site-filter";

export const PROFILE_LABELS: Record<string, string> = { echo: "echo time", capture: "timer capture", pulse_coded: "pulse-coded", duty_coded: "duty-coded" };

/** Offline when nothing arrived for three expected intervals (the product's health rule). */
export function isOffline(d: Pick<DeviceJson, "last_seen_at" | "expected_interval_s">, now = Date.now()): boolean {
  return !!d.last_seen_at && now - new Date(d.last_seen_at).getTime() > 3 * d.expected_interval_s * 1000;
}

const column = createColumnHelper<DeviceJson>();
const FILTERS = ["site_id"] as const;

export function DeviceTable() {
  const list = useListParams(deviceListQuerySchema, FILTERS, FILTERS);
  const siteId = list.values.site_id ?? "";
  const fig = useFigures();
  const sites = useSites();
  const { data, error, isLoading, mutate } = useSWR<{ items: DeviceJson[] }>(siteId ? `/api/devices?site_id=${siteId}` : "/api/devices", swrFetcher, { refreshInterval: 30000 });
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "…";

  const columns = [
    column.accessor("name", { header: "Name", cell: (c) => <Link href={`/devices/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link> }),
    column.accessor("serial", { header: "Serial", meta: { cellClassName: "figures" } }),
    column.accessor((d) => siteName(d.site_id), { id: "site", header: "Site" }),
    column.accessor((d) => PROFILE_LABELS[d.profile] ?? d.profile, { id: "profile", header: "Profile" }),
    column.accessor((d) => d.channels.length, { id: "channels", header: "Channels", meta: { cellClassName: "figures" } }),
    column.accessor("last_seen_at", {
      header: "Last seen",
      meta: { cellClassName: "figures" },
      cell: (c) => (
        <>
          {c.getValue() ? <RelativeTime at={c.getValue()!} /> : "never"}
          {isOffline(c.row.original) && <span className="font-sans"> · offline</span>}
        </>
      ),
    }),
    column.accessor("battery_v", { header: "Battery", cell: (c) => fig.volts(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor("rssi_dbm", { header: "Signal", cell: (c) => fig.dbm(c.getValue()), meta: { cellClassName: "figures" } }),
  ];

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap gap-4" role="group" aria-label="Filters">
        <SiteFilter id="device-filter-site" value={siteId} onChange={(v) => list.set({ site_id: v })} />
        <ClearFilters filtered={list.filtered} onClear={list.clearFilters} />
      </div>
      <DataTable data={data?.items} columns={columns} getRowId={(d) => d.id} label="Devices" loading={isLoading} error={error} retry={() => mutate()} empty="No devices here yet." />
    </div>
  );
}
