"use client";

import Link from "next/link";
import useSWR from "swr";
import { useMemo, useState } from "react";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type RowSelectionState, type SortingState } from "@tanstack/react-table";
import { formatDistanceToNowStrict } from "date-fns";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import { ALARM_KINDS, alarmKindLabel, needsAcknowledgement, type AlarmKind } from "@/lib/alarms/engine";
import { ALARM_PRIORITIES, ALARM_STATES, type AlarmPriority, type AlarmState } from "@/lib/alarms/state-machine";
import { ALARM_SORTS, type AlarmSort } from "@/lib/validations/alarm";
import { isUuid } from "@/lib/validations/common";
import type { AlarmJson } from "@/lib/services/alarms";
import type { SiteJson } from "@/lib/services/sites";
import { Loading, LoadError } from "./data-state";
import { STACKED_TABLE } from "./site-provisioning-kit";
import { AlarmPriorityBadge, AlarmStateLabel, STATE_WORDS, alarmFigure, alarmWhere } from "./alarm-badges";
import { AlarmActionDialog, type AlarmDialogMode } from "./alarm-actions";

interface AlarmPage {
  total: number;
  page: number;
  page_size: number;
  items: AlarmJson[];
}

const PAGE_SIZE = 50;
const SORTABLE: Record<string, string> = { priority: "priority", alarm: "asset", site: "site", state: "state", since: "activated_at" };

function sortToState(sort: AlarmSort): SortingState {
  const desc = sort.startsWith("-");
  const key = desc ? sort.slice(1) : sort;
  const column = Object.entries(SORTABLE).find(([, v]) => v === key)?.[0];
  return column ? [{ id: column, desc }] : [];
}

function stateToSort(s: SortingState): AlarmSort {
  if (!s.length) return "priority";
  const key = SORTABLE[s[0].id];
  return (s[0].desc ? `-${key}` : key) as AlarmSort;
}

interface Filters {
  state: string;
  site_id: string;
  priority: string;
  kind: string;
  from: string;
  to: string;
  sort: AlarmSort;
  page: number;
  /** Alarms suppressed by design are shown only on request. */
  suppressed: boolean;
}

function readFilters(params: URLSearchParams): Filters {
  const oneOf = (key: string, allowed: readonly string[], fallback = "") => (allowed.includes(params.get(key) ?? "") ? (params.get(key) as string) : fallback);
  const date = (key: string) => (/^\d{4}-\d{2}-\d{2}$/.test(params.get(key) ?? "") ? (params.get(key) as string) : "");
  return {
    state: oneOf("state", ["active", "all", ...ALARM_STATES], "active"),
    site_id: isUuid(params.get("site_id") ?? "") ? (params.get("site_id") as string) : "",
    priority: oneOf("priority", ALARM_PRIORITIES),
    kind: oneOf("kind", ALARM_KINDS),
    from: date("from"),
    to: date("to"),
    sort: oneOf("sort", ALARM_SORTS, "priority") as AlarmSort,
    page: Math.max(1, Number(params.get("page") ?? 1) || 1),
    suppressed: params.get("include") === "suppressed",
  };
}

function apiQuery(f: Filters): string {
  const q = new URLSearchParams({ sort: f.sort, page: String(f.page), page_size: String(PAGE_SIZE) });
  if (f.state !== "all") q.set("state", f.state);
  if (f.site_id) q.set("site_id", f.site_id);
  if (f.priority) q.set("priority", f.priority);
  if (f.kind) q.set("kind", f.kind);
  if (f.suppressed) q.set("include", "suppressed");
  // Dates in the URL are local calendar days; the API takes instants.
  if (f.from) q.set("from", new Date(`${f.from}T00:00:00`).toISOString());
  if (f.to) q.set("to", new Date(new Date(`${f.to}T00:00:00`).getTime() + 86_400_000).toISOString());
  return q.toString();
}

/** The alarms list: server-paged and sorted, filters kept in the URL, acknowledge and shelve where the role allows. */
export function AlarmTable({ role }: { role: Role }) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const filters = readFilters(new URLSearchParams(params.toString()));
  const { data, error, isLoading, mutate } = useSWR<AlarmPage>(`/api/alarms?${apiQuery(filters)}`, swrFetcher, { refreshInterval: 15_000, keepPreviousData: true });
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [dialog, setDialog] = useState<{ mode: AlarmDialogMode; ids: string[]; title: string } | null>(null);
  const [note, setNote] = useState<string | null>(null);
  const mayAck = can(role, "alarm:acknowledge");
  const mayShelve = can(role, "alarm:shelve");

  function setParam(changes: Record<string, string>) {
    const next = new URLSearchParams(params.toString());
    for (const [k, v] of Object.entries(changes)) {
      if (v) next.set(k, v);
      else next.delete(k);
    }
    if (!("page" in changes)) next.delete("page");
    const qs = next.toString();
    setSelection({});
    router.replace(qs ? `${pathname}?${qs}` : pathname, { scroll: false });
  }

  const columns = useMemo<ColumnDef<AlarmJson>[]>(() => {
    const cols: ColumnDef<AlarmJson>[] = [];
    if (mayAck) {
      cols.push({
        id: "select",
        enableSorting: false,
        header: ({ table }) => (
          <input
            type="checkbox"
            aria-label="Select every alarm on this page that can be acknowledged"
            checked={table.getIsAllPageRowsSelected()}
            ref={(el) => {
              if (el) el.indeterminate = table.getIsSomePageRowsSelected();
            }}
            onChange={table.getToggleAllPageRowsSelectedHandler()}
          />
        ),
        cell: ({ row }) => (
          <input
            type="checkbox"
            aria-label={`Select ${row.original.label} at ${alarmWhere(row.original)}`}
            checked={row.getIsSelected()}
            disabled={!row.getCanSelect()}
            onChange={row.getToggleSelectedHandler()}
          />
        ),
      });
    }
    cols.push(
      {
        id: "priority",
        header: "Priority",
        cell: ({ row }) => <AlarmPriorityBadge priority={row.original.priority as AlarmPriority} calm={row.original.state === "normal"} />,
      },
      {
        id: "alarm",
        header: "Alarm",
        cell: ({ row }) => (
          <Link href={`/alarms/${row.original.id}`} className="hover:underline">
            <span className="font-bold">{row.original.label}</span>
            <span className="text-muted"> · {alarmWhere(row.original)}</span>
          </Link>
        ),
      },
      { id: "site", header: "Site", cell: ({ row }) => row.original.site.name },
      {
        id: "value",
        header: "Value / setpoint",
        enableSorting: false,
        cell: ({ row }) => (
          <span className="figures whitespace-nowrap">
            {alarmFigure(row.original.value, row.original.unit, row.original.kind)}
            {row.original.setpoint !== null && <span className="text-muted"> / {alarmFigure(row.original.setpoint, row.original.unit, row.original.kind)}</span>}
          </span>
        ),
      },
      {
        id: "state",
        header: "State",
        cell: ({ row }) => (
          <>
            <AlarmStateLabel state={row.original.state as AlarmState} awaitingReset={row.original.awaiting_reset} />
            {row.original.shelved_until && <span className="text-muted"> until {new Date(row.original.shelved_until).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" })}</span>}
          </>
        ),
      },
      {
        id: "since",
        header: "Since",
        cell: ({ row }) =>
          row.original.state === "normal" ? (
            row.original.cleared_at ? <span className="whitespace-nowrap text-muted">cleared {formatDistanceToNowStrict(new Date(row.original.cleared_at))} ago</span> : "—"
          ) : row.original.activated_at ? (
            <time dateTime={row.original.activated_at} title={new Date(row.original.activated_at).toLocaleString()} className="figures whitespace-nowrap">
              {formatDistanceToNowStrict(new Date(row.original.activated_at))}
            </time>
          ) : (
            "—"
          ),
      },
    );
    if (mayAck || mayShelve) {
      cols.push({
        id: "actions",
        enableSorting: false,
        header: () => <span className="sr-only">Actions</span>,
        cell: ({ row }) => {
          const a = row.original;
          const what = `${a.label} at ${alarmWhere(a)}`;
          return (
            <span className="flex justify-end gap-2 whitespace-nowrap">
              {mayAck && needsAcknowledgement(a.state as AlarmState) && (
                <button type="button" className="btn-quiet h-8 px-3" aria-label={`Acknowledge ${what}`} onClick={() => setDialog({ mode: "acknowledge", ids: [a.id], title: `Acknowledge ${what}` })}>
                  Acknowledge
                </button>
              )}
              {mayShelve && !["shelved", "suppressed_by_design", "out_of_service"].includes(a.state) && (
                <button type="button" className="btn-quiet h-8 px-3" aria-label={`Shelve ${what}`} onClick={() => setDialog({ mode: "shelve", ids: [a.id], title: `Shelve ${what}` })}>
                  Shelve for…
                </button>
              )}
            </span>
          );
        },
      });
    }
    return cols;
  }, [mayAck, mayShelve]);

  // TanStack Table keeps its own state and hands out fresh functions each render; the compiler skips this component, as intended.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    getRowId: (a) => a.id,
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    enableSortingRemoval: false,
    pageCount: data ? Math.max(1, Math.ceil(data.total / data.page_size)) : 1,
    state: { sorting: sortToState(filters.sort), rowSelection: selection },
    enableRowSelection: (row) => needsAcknowledgement(row.original.state as AlarmState),
    onRowSelectionChange: setSelection,
    onSortingChange: (updater) => setParam({ sort: stateToSort(typeof updater === "function" ? updater(sortToState(filters.sort)) : updater) }),
  });

  const selected = Object.keys(selection).filter((id) => selection[id]);
  const pages = table.getPageCount();

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-4" role="group" aria-label="Filters">
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={filters.suppressed} onChange={(e) => setParam({ include: e.target.checked ? "suppressed" : "" })} />
          Show suppressed by design
        </label>
        <div>
          <label htmlFor="alarm-filter-state" className="label">State</label>
          <select id="alarm-filter-state" className="field" value={filters.state} onChange={(e) => setParam({ state: e.target.value === "active" ? "" : e.target.value })}>
            <option value="active">Needing attention or hidden (not normal)</option>
            <option value="all">All states</option>
            {ALARM_STATES.map((s) => <option key={s} value={s}>{STATE_WORDS[s]}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="alarm-filter-site" className="label">Site</label>
          <select id="alarm-filter-site" className="field" value={filters.site_id} onChange={(e) => setParam({ site_id: e.target.value })}>
            <option value="">All sites</option>
            {sites.data?.items.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="alarm-filter-priority" className="label">Priority</label>
          <select id="alarm-filter-priority" className="field" value={filters.priority} onChange={(e) => setParam({ priority: e.target.value })}>
            <option value="">All priorities</option>
            {ALARM_PRIORITIES.map((p) => <option key={p} value={p} className="capitalize">{p}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="alarm-filter-kind" className="label">Condition</label>
          <select id="alarm-filter-kind" className="field" value={filters.kind} onChange={(e) => setParam({ kind: e.target.value })}>
            <option value="">All conditions</option>
            {ALARM_KINDS.map((k) => <option key={k} value={k}>{alarmKindLabel(k as AlarmKind)}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="alarm-filter-from" className="label">Began from</label>
          <input id="alarm-filter-from" type="date" className="field figures" value={filters.from} onChange={(e) => setParam({ from: e.target.value })} />
        </div>
        <div>
          <label htmlFor="alarm-filter-to" className="label">to</label>
          <input id="alarm-filter-to" type="date" className="field figures" value={filters.to} onChange={(e) => setParam({ to: e.target.value })} />
        </div>
      </div>

      {note && <p role="status" className="border-l-4 border-rule bg-card px-3 py-2 text-sm">{note}</p>}
      {mayAck && selected.length > 0 && (
        <div className="flex items-center gap-3 text-sm" role="group" aria-label="Selected alarms">
          <span className="figures">{selected.length} selected</span>
          <button type="button" className="btn h-9" onClick={() => setDialog({ mode: "acknowledge", ids: selected, title: `Acknowledge ${selected.length} alarm${selected.length > 1 ? "s" : ""}` })}>
            Acknowledge selected
          </button>
        </div>
      )}

      <section className="card overflow-x-auto" aria-label="Alarms">
        {isLoading && !data && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No alarms match these filters.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <thead>
              {table.getHeaderGroups().map((g) => (
                <tr key={g.id}>
                  {g.headers.map((h) => {
                    const sorted = h.column.getIsSorted();
                    return (
                      <th key={h.id} scope="col" aria-sort={sorted ? (sorted === "desc" ? "descending" : "ascending") : undefined}>
                        {h.column.getCanSort() && SORTABLE[h.column.id] ? (
                          <button type="button" className="inline-flex items-center gap-1 uppercase hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                            {flexRender(h.column.columnDef.header, h.getContext())}
                            <span aria-hidden="true">{sorted === "asc" ? "↑" : sorted === "desc" ? "↓" : "↕"}</span>
                          </button>
                        ) : (
                          flexRender(h.column.columnDef.header, h.getContext())
                        )}
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              {table.getRowModel().rows.map((row) => (
                <tr key={row.id} data-alarm-id={row.id} data-state={row.original.state}>
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} data-label={typeof cell.column.columnDef.header === "string" ? cell.column.columnDef.header : ""}>
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        )}
        {data && (
          <nav aria-label="Pages" className="flex items-center gap-3 p-3 text-sm">
            <span className="figures">
              {data.total} alarm{data.total === 1 ? "" : "s"} · page {data.page} of {pages}
            </span>
            {filters.page > 1 && <button type="button" className="btn-quiet h-8" onClick={() => setParam({ page: String(filters.page - 1) })}>Previous</button>}
            {filters.page < pages && <button type="button" className="btn-quiet h-8" onClick={() => setParam({ page: String(filters.page + 1) })}>Next</button>}
          </nav>
        )}
      </section>

      {dialog && (
        <AlarmActionDialog
          mode={dialog.mode}
          ids={dialog.ids}
          title={dialog.title}
          onClose={() => setDialog(null)}
          onDone={(message) => {
            setDialog(null);
            setSelection({});
            setNote(message);
            mutate();
          }}
        />
      )}
    </div>
  );
}
