"use client";

import Link from "next/link";
import useSWR from "swr";
import { useMemo, useState } from "react";
import { getCoreRowModel, useReactTable, type ColumnDef, type RowSelectionState, type SortingState } from "@tanstack/react-table";
import { formatDistanceToNowStrict } from "date-fns";
import { can, type Role } from "@/lib/auth/permissions";
import { swrFetcher } from "@/lib/fetcher";
import { ALARM_KINDS, alarmKindLabel, needsAcknowledgement, type AlarmKind } from "@/lib/alarms/engine";
import { ALARM_PRIORITIES, ALARM_STATES, type AlarmState } from "@/lib/alarms/state-machine";
import { alarmListQuerySchema, type AlarmSort } from "@/lib/validations/alarm";
import type { AlarmJson } from "@/lib/services/alarms";
import { DataTableView } from "@/components/ui/data-table";
import { useListParams } from "@/components/ui/list-params";
import { ClearFilters } from "@/components/ui/clear-filters";
import { AlarmStateLabel, alarmFigure, alarmWhere } from "@/components/alarms/alarm-badges";
import { useFigures } from "@/components/ui/display-settings";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { ALARM_STATE_WORDS } from "@/lib/alarms/vocabulary";
import { SiteTime } from "@/components/ui/site-time";
import { AlarmActionDialog, type AlarmDialogMode } from "@/components/alarms/alarm-actions";
import { SiteFilter } from "@/components/ui/site-filter";

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

const FILTER_KEYS = ["state", "site_id", "priority", "kind", "from", "to", "include"] as const;
const URL_KEYS = [...FILTER_KEYS, "sort", "page"] as const;

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

/** The URL's values as the table uses them: "all" states is the one value beyond the API's schema. */
function asFilters(values: Partial<Record<(typeof URL_KEYS)[number], string>>, rawState: string | null): Filters {
  const day = (v?: string) => (v && /^\d{4}-\d{2}-\d{2}$/.test(v) ? v : "");
  return {
    state: rawState === "all" ? "all" : values.state && !values.state.includes(",") ? values.state : "active",
    site_id: values.site_id ?? "",
    priority: values.priority && !values.priority.includes(",") ? values.priority : "",
    kind: values.kind && !values.kind.includes(",") ? values.kind : "",
    from: day(values.from),
    to: day(values.to),
    sort: (values.sort ?? "priority") as AlarmSort,
    page: Number(values.page ?? 1),
    suppressed: values.include === "suppressed",
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
  const list = useListParams(alarmListQuerySchema, URL_KEYS, FILTER_KEYS);
  const filters = asFilters(list.values, list.raw("state"));
  const { data, error, isLoading, mutate } = useSWR<AlarmPage>(`/api/alarms?${apiQuery(filters)}`, swrFetcher, { refreshInterval: 15_000, keepPreviousData: true });
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [dialog, setDialog] = useState<{ mode: AlarmDialogMode; ids: string[]; title: string } | null>(null);
  const [note, setNote] = useState<string | null>(null);
  const fig = useFigures();
  const mayAck = can(role, "alarm:acknowledge");
  const mayShelve = can(role, "alarm:shelve");

  function setParam(changes: Partial<Record<(typeof URL_KEYS)[number], string>>) {
    setSelection({});
    list.set(changes);
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
        accessorFn: (a) => a.priority,
        header: "Priority",
        sortDescFirst: false,
        cell: ({ row }) => <PriorityBadge priority={row.original.priority} calm={row.original.state === "normal"} />,
      },
      {
        id: "alarm",
        accessorFn: (a) => a.asset?.name ?? a.label,
        header: "Alarm",
        cell: ({ row }) => (
          <Link href={`/alarms/${row.original.id}`} className="hover:underline">
            <span className="font-bold">{row.original.label}</span>
            <span className="text-muted"> · {alarmWhere(row.original)}</span>
          </Link>
        ),
      },
      { id: "site", accessorFn: (a) => a.site.name, header: "Site" },
      {
        id: "value",
        header: "Value / setpoint",
        enableSorting: false,
        cell: ({ row }) => (
          <span className="figures whitespace-nowrap">
            {alarmFigure(fig, row.original.value, row.original.unit, row.original.kind)}
            {row.original.setpoint !== null && <span className="text-muted"> / {alarmFigure(fig, row.original.setpoint, row.original.unit, row.original.kind)}</span>}
          </span>
        ),
      },
      {
        id: "state",
        accessorFn: (a) => a.state,
        header: "State",
        cell: ({ row }) => (
          <>
            <AlarmStateLabel state={row.original.state as AlarmState} awaitingReset={row.original.awaiting_reset} />
            {row.original.shelved_until && <span className="text-muted"> until <SiteTime at={row.original.shelved_until} zone={row.original.site.time_zone} show="time" /></span>}
          </>
        ),
      },
      {
        id: "since",
        accessorFn: (a) => a.activated_at,
        header: "Since",
        cell: ({ row }) =>
          row.original.state === "normal" ? (
            row.original.cleared_at ? <span className="whitespace-nowrap text-muted">cleared {formatDistanceToNowStrict(new Date(row.original.cleared_at))} ago</span> : "—"
          ) : row.original.activated_at ? (
            <span className="figures whitespace-nowrap">
              {formatDistanceToNowStrict(new Date(row.original.activated_at))} · <SiteTime at={row.original.activated_at} zone={row.original.site.time_zone} className="text-muted" />
            </span>
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
                <button type="button" className="btn-quiet md:h-8 px-3" aria-label={`Acknowledge ${what}`} onClick={() => setDialog({ mode: "acknowledge", ids: [a.id], title: `Acknowledge ${what}` })}>
                  Acknowledge
                </button>
              )}
              {mayShelve && !["shelved", "suppressed_by_design", "out_of_service"].includes(a.state) && (
                <button type="button" className="btn-quiet md:h-8 px-3" aria-label={`Shelve ${what}`} onClick={() => setDialog({ mode: "shelve", ids: [a.id], title: `Shelve ${what}` })}>
                  Shelve for…
                </button>
              )}
            </span>
          );
        },
      });
    }
    return cols;
  }, [mayAck, mayShelve, fig]);

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
          <select id="alarm-filter-state" className="field w-auto" value={filters.state} onChange={(e) => setParam({ state: e.target.value === "active" ? "" : e.target.value })}>
            <option value="active">Not normal</option>
            <option value="all">All states</option>
            {ALARM_STATES.map((s) => <option key={s} value={s}>{ALARM_STATE_WORDS[s]}</option>)}
          </select>
        </div>
        <SiteFilter id="alarm-filter-site" value={filters.site_id} onChange={(v) => setParam({ site_id: v })} />
        <div>
          <label htmlFor="alarm-filter-priority" className="label">Priority</label>
          <select id="alarm-filter-priority" className="field w-auto" value={filters.priority} onChange={(e) => setParam({ priority: e.target.value })}>
            <option value="">All priorities</option>
            {ALARM_PRIORITIES.map((p) => <option key={p} value={p} className="capitalize">{p}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="alarm-filter-kind" className="label">Condition</label>
          <select id="alarm-filter-kind" className="field w-auto" value={filters.kind} onChange={(e) => setParam({ kind: e.target.value })}>
            <option value="">All conditions</option>
            {ALARM_KINDS.map((k) => <option key={k} value={k}>{alarmKindLabel(k as AlarmKind)}</option>)}
          </select>
        </div>
        <fieldset className="flex items-end gap-2 whitespace-nowrap">
          <legend className="sr-only">Began between</legend>
          <div>
            <label htmlFor="alarm-filter-from" className="label">Began from</label>
            <input id="alarm-filter-from" type="date" className="field figures w-40" value={filters.from} onChange={(e) => setParam({ from: e.target.value })} />
          </div>
          <div>
            <label htmlFor="alarm-filter-to" className="label">to</label>
            <input id="alarm-filter-to" type="date" className="field figures w-40" value={filters.to} onChange={(e) => setParam({ to: e.target.value })} />
          </div>
        </fieldset>
        <ClearFilters filtered={list.filtered} onClear={() => { setSelection({}); list.clearFilters(); }} />
      </div>

      {note && <p role="status" className="border-l-4 border-rule bg-card px-3 py-2 text-sm">{note}</p>}
      {mayAck && selected.length > 0 && (
        <div className="flex items-center gap-3 text-sm" role="group" aria-label="Selected alarms">
          <span className="figures">{selected.length} selected</span>
          <button type="button" className="btn md:h-9" onClick={() => setDialog({ mode: "acknowledge", ids: selected, title: `Acknowledge ${selected.length} alarm${selected.length > 1 ? "s" : ""}` })}>
            Acknowledge selected
          </button>
        </div>
      )}

      <DataTableView
        table={table}
        label="Alarms"
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty="No alarms match these filters."
        rowProps={(row) => ({ "data-alarm-id": row.id, "data-state": row.original.state })}
        footer={
          data && (
            <nav aria-label="Pages" className="flex items-center gap-3 p-3 text-sm">
              <span className="figures">
                {data.total} alarm{data.total === 1 ? "" : "s"} · page {data.page} of {pages}
              </span>
              {filters.page > 1 && <button type="button" className="btn-quiet" onClick={() => setParam({ page: String(filters.page - 1) })}>Previous</button>}
              {filters.page < pages && <button type="button" className="btn-quiet" onClick={() => setParam({ page: String(filters.page + 1) })}>Next</button>}
            </nav>
          )
        }
      />

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
