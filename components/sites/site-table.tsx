"use client";

import Link from "next/link";
import useSWR from "swr";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import type { SiteJson } from "@/lib/services/sites";
import type { AssetJson } from "@/lib/services/assets";
import type { DeviceJson } from "@/lib/services/devices";
import { createColumnHelper } from "@tanstack/react-table";
import { useFigures } from "@/components/ui/display-settings";
import { DataTable } from "@/components/ui/data-table";

function countBySite(items: { site_id: string }[] | undefined): Map<string, number> {
  const counts = new Map<string, number>();
  for (const item of items ?? []) counts.set(item.site_id, (counts.get(item.site_id) ?? 0) + 1);
  return counts;
}

const column = createColumnHelper<SiteJson>();

export function SiteTable({ role }: { role: Role }) {
  const fig = useFigures();
  const { data, error, isLoading, mutate } = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  // Counts come from the two lists the other screens load anyway; no extra endpoint needed.
  const assets = useSWR<{ items: AssetJson[] }>("/api/assets", swrFetcher);
  const devices = useSWR<{ items: DeviceJson[] }>("/api/devices", swrFetcher);
  const assetCounts = countBySite(assets.data?.items);
  const deviceCounts = countBySite(devices.data?.items);
  const count = (counts: Map<string, number>, ready: boolean, id: string) => (ready ? String(counts.get(id) ?? 0) : "…");
  const manage = can(role, "site:manage");

  const columns = [
    column.accessor("name", { header: "Name", cell: (c) => <Link href={`/sites/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link> }),
    column.accessor("time_zone", { header: "Time zone" }),
    column.accessor("air_temp_c", { header: "Fallback air temperature", cell: (c) => (c.getValue() == null ? `none (${fig.temperature(20)})` : fig.temperature(c.getValue())), meta: { cellClassName: "figures" } }),
    column.accessor("humidity_pct", { header: "Humidity", cell: (c) => fig.percent(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor("escalation_delay_min", { header: "Escalation delay", cell: (c) => `${c.getValue()} min`, meta: { cellClassName: "figures" } }),
    column.accessor((s) => assetCounts.get(s.id) ?? 0, { id: "assets", header: "Assets", cell: (c) => <Link className="underline" href={`/assets?site_id=${c.row.original.id}`}>{count(assetCounts, !!assets.data, c.row.original.id)}</Link>, meta: { cellClassName: "figures" } }),
    column.accessor((s) => deviceCounts.get(s.id) ?? 0, { id: "devices", header: "Devices", cell: (c) => <Link className="underline" href={`/devices?site_id=${c.row.original.id}`}>{count(deviceCounts, !!devices.data, c.row.original.id)}</Link>, meta: { cellClassName: "figures" } }),
    ...(manage
      ? [column.display({ id: "actions", header: () => <span className="sr-only">Actions</span>, cell: (c) => <Link className="btn-quiet" href={`/sites/${c.row.original.id}/edit`} aria-label={`Edit ${c.row.original.name}`}>Edit</Link>, meta: { cellClassName: "text-right" } })]
      : []),
  ];

  return <DataTable data={data?.items} columns={columns} getRowId={(s) => s.id} label="Sites" loading={isLoading} error={error} retry={() => mutate()} empty={`No sites yet.${manage ? " Add the first one." : ""}`} />;
}
