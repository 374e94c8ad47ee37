"use client";

import { RelativeTime } from "@/components/ui/site-time";

import Link from "next/link";
import { useState } from "react";
import useSWR from "swr";
import { createColumnHelper, getCoreRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import type { DeviceHealthPage, DeviceHealthRow } from "@/lib/read-models/overview-devices";
import { swrFetcher } from "@/lib/fetcher";
import { DEVICE_HEALTH_FLAGS, deviceHealthQuerySchema, type DeviceHealthSort } from "@/lib/validations/overview";
import { Figure } from "@/components/ui/display-settings";
import { LIVE_REFRESH_MS } from "@/components/fleet/fleet-overview";
import { FlagTag, flagLabel } from "@/components/fleet/fleet-status";
import { DataTableView } from "@/components/ui/data-table";
import { ClearFilters } from "@/components/ui/clear-filters";
import { useListParams } from "@/components/ui/list-params";
import { SiteFilter } from "@/components/ui/site-filter";

// The devices health table: when each device was last heard, its battery, signal, firmware and the
// open sensor flags of each channel. Paged, sorted and filtered on the server; every choice is kept in
// the URL (page, page_size, sort, dir, q, site_id, state, flag).

const PAGE_SIZES = [25, 50, 100];
const FILTER_KEYS = ["q", "site_id", "state", "flag"] as const;
const URL_KEYS = [...FILTER_KEYS, "page", "page_size", "sort", "dir"] as const;
const STATE_LABELS = { offline: "Offline", flagged: "With sensor faults", healthy: "Healthy" } as const;

const column = createColumnHelper<DeviceHealthRow>();

function ChannelFlags({ row }: { row: DeviceHealthRow }) {
  if (!row.channels.length) return <span className="text-muted">no channels</span>;
  return (
    <ul className="space-y-0.5 text-left">
      {row.channels.map((c) => (
        <li key={c.id} className="flex flex-wrap items-center gap-1">
          <span className="figures text-muted">{c.index}</span>
          {c.asset_id ? <Link href={`/assets/${c.asset_id}`} className="underline">{c.asset_name}</Link> : <span className="text-muted">unassigned</span>}
          {c.flags.length ? c.flags.map((f) => <FlagTag key={f.flag} flag={f.flag} />) : <span className="text-muted">· no fault</span>}
        </li>
      ))}
    </ul>
  );
}

const columns = [
  column.accessor("name", {
    id: "name",
    header: "Device",
    cell: (c) => (
      <span>
        <Link href={`/devices/${c.row.original.id}`} className="font-bold underline">{c.getValue()}</Link>
        <span className="figures block text-xs text-muted">{c.row.original.serial}</span>
      </span>
    ),
  }),
  column.accessor("site_name", { id: "site", header: "Site" }),
  column.accessor("last_seen_at", {
    id: "last_seen",
    header: "Last seen",
    cell: (c) => (
      <span className="figures">
        {c.getValue() ? <RelativeTime at={c.getValue() as string} /> : "never"}
        {c.row.original.offline && <span className="ml-1 font-sans font-bold text-high">offline</span>}
      </span>
    ),
  }),
  column.accessor("battery_v", { id: "battery", header: "Battery", cell: (c) => <span className="figures"><Figure kind="volts" value={c.getValue()} /></span> }),
  column.accessor("rssi_dbm", { id: "signal", header: "Signal", cell: (c) => <span className="figures"><Figure kind="dbm" value={c.getValue()} /></span> }),
  column.accessor("open_flags", { id: "flags", header: "Channels and flags", cell: (c) => <ChannelFlags row={c.row.original} /> }),
  column.accessor("firmware", { id: "firmware", header: "Firmware", cell: (c) => <span className="figures">{c.getValue() ?? "—"}</span> }),
];

export function DeviceHealthTable() {
  const list = useListParams(deviceHealthQuerySchema, URL_KEYS, FILTER_KEYS);
  const { values } = list;
  const page = Number(values.page ?? 1);
  const pageSize = PAGE_SIZES.includes(Number(values.page_size)) ? Number(values.page_size) : PAGE_SIZES[0];
  const sort = (values.sort ?? "name") as DeviceHealthSort;
  const dir = values.dir ?? "asc";
  const [search, setSearch] = useState(values.q ?? "");

  const api = new URLSearchParams({ page: String(page), page_size: String(pageSize), sort, dir });
  for (const k of FILTER_KEYS) if (values[k]) api.set(k, values[k]);

  const { data, error, isLoading, mutate } = useSWR<DeviceHealthPage>(`/api/device-health?${api.toString()}`, swrFetcher, { refreshInterval: LIVE_REFRESH_MS, keepPreviousData: true });

  const sorting: SortingState = [{ id: sort, desc: dir === "desc" }];
  const pageCount = data ? Math.max(1, Math.ceil(data.total / pageSize)) : 1;
  // TanStack Table's instance is not memoisable; this component is simply not memoised by the compiler.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    manualFiltering: true,
    pageCount,
    state: { sorting, pagination: { pageIndex: page - 1, pageSize } },
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      const first = next[0];
      list.set({ sort: first?.id ?? null, dir: first?.desc ? "desc" : null });
    },
    enableSortingRemoval: false,
  });

  return (
    <div className="space-y-4">
      <form
        className="flex flex-wrap items-end gap-3"
        role="search"
        aria-label="Filter devices"
        onSubmit={(e) => {
          e.preventDefault();
          list.set({ q: search.trim() || null });
        }}
      >
        <div>
          <label htmlFor="health-q" className="label">Name or serial</label>
          <input id="health-q" className="field h-10 w-56" value={search} onChange={(e) => setSearch(e.target.value)} />
        </div>
        <button type="submit" className="btn-quiet">Search</button>
        <SiteFilter id="health-site" className="field h-10 w-auto" value={values.site_id ?? ""} onChange={(v) => list.set({ site_id: v })} />
        <div>
          <label htmlFor="health-state" className="label">State</label>
          <select id="health-state" className="field h-10 w-auto" value={values.state ?? ""} onChange={(e) => list.set({ state: e.target.value })}>
            <option value="">Every device</option>
            {Object.entries(STATE_LABELS).map(([k, label]) => <option key={k} value={k}>{label}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="health-flag" className="label">Sensor flag</label>
          <select id="health-flag" className="field h-10 w-auto" value={values.flag ?? ""} onChange={(e) => list.set({ flag: e.target.value })}>
            <option value="">Any or none</option>
            {DEVICE_HEALTH_FLAGS.map((f) => <option key={f} value={f}>{flagLabel(f)}</option>)}
          </select>
        </div>
        <ClearFilters
          filtered={list.filtered}
          onClear={() => {
            setSearch("");
            list.clearFilters();
          }}
        />
      </form>

      <DataTableView
        table={table}
        label="Device health"
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty="No device matches these filters."
        rowProps={() => ({ "data-testid": "device-health-row" })}
      />

      {data && (
        <nav aria-label="Pages" className="flex flex-wrap items-center gap-3 text-sm">
          <button type="button" className="btn-quiet md:h-9" disabled={page <= 1} onClick={() => list.set({ page: String(page - 1) })}>Previous page</button>
          <span>
            Page <span className="figures">{page}</span> of <span className="figures">{pageCount}</span> · <span className="figures">{data.total}</span> devices
          </span>
          <button type="button" className="btn-quiet md:h-9" disabled={page >= pageCount} onClick={() => list.set({ page: String(page + 1) })}>Next page</button>
          <label htmlFor="health-page-size" className="ml-auto">Rows a page</label>
          <select id="health-page-size" className="field h-9 w-auto py-1" value={pageSize} onChange={(e) => list.set({ page_size: e.target.value })}>
            {PAGE_SIZES.map((n) => <option key={n} value={n}>{n}</option>)}
          </select>
        </nav>
      )}
    </div>
  );
}
