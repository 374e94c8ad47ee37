"use client";

import { useId, useState } from "react";
import {
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type Header,
  type Row,
  type RowData,
  type SortingState,
  type Table,
} from "@tanstack/react-table";
import { Loading, LoadError } from "@/components/ui/data-state";

// Every list in the app draws through this table: sortable headers with aria-sort, the loading, error and
// empty states, and at phone width each row as a stacked card whose cells carry their column's name.

declare module "@tanstack/react-table" {
  // eslint-disable-next-line @typescript-eslint/no-unused-vars -- the generics must match TanStack's declaration
  interface ColumnMeta<TData extends RowData, TValue> {
    /** The name a cell shows in the stacked card when the header is not plain text. */
    label?: string;
    /** Classes of the column's cells (alignment, figures). */
    cellClassName?: string;
    /** Classes of the column's header cell (a fixed width in a table-fixed layout). */
    headerClassName?: string;
  }
}

/** A dense table at desktop width; at phone width each row becomes a stacked card, each cell labelled by data-label. */
export const STACKED_TABLE =
  "table-dense w-full max-md:[&_thead]:sr-only max-md:[&_tr]:block max-md:[&_tr]:border-b max-md:[&_tr]:border-rule max-md:[&_tr]:py-2 max-md:[&_td]:flex max-md:[&_td]:h-auto max-md:[&_td]:min-h-10 max-md:[&_td]:items-center max-md:[&_td]:justify-between max-md:[&_td]:gap-4 max-md:[&_td]:border-0 max-md:[&_td]:py-1 max-md:[&_td]:text-right max-md:[&_td]:before:shrink-0 max-md:[&_td]:before:text-left max-md:[&_td]:before:font-sans max-md:[&_td]:before:font-bold max-md:[&_td]:before:content-[attr(data-label)]";

function headerLabel<T>(column: Header<T, unknown>["column"]): string {
  const header = column.columnDef.header;
  return typeof header === "string" ? header : (column.columnDef.meta?.label ?? "");
}

function SortableHeader<T>({ header }: { header: Header<T, unknown> }) {
  const sorted = header.column.getIsSorted();
  const content = flexRender(header.column.columnDef.header, header.getContext());
  const className = header.column.columnDef.meta?.headerClassName;
  if (!header.column.getCanSort()) return <th scope="col" className={className}>{content}</th>;
  return (
    <th scope="col" className={className} aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}>
      <button type="button" className="-mx-1 inline-flex min-h-10 items-center gap-1 px-1 uppercase hover:text-ink" onClick={header.column.getToggleSortingHandler()}>
        {content}
        <span aria-hidden="true">{sorted === "asc" ? "↑" : sorted === "desc" ? "↓" : "↕"}</span>
      </button>
    </th>
  );
}

export interface DataTableStates<T> {
  /** The list's name, read by screen readers (and shown as its heading with `title`). */
  label: string;
  /** Shows `label` as the list's heading inside its card. */
  title?: boolean;
  /** Shows `label` as the table's visible caption (a list under a heading of its own); otherwise the caption is for screen readers. */
  caption?: boolean;
  /** Drawn without a card or region of its own, inside a card that already frames it (its table keeps `label` as caption). */
  bare?: boolean;
  /** Classes added to the <table> (md:table-fixed). */
  tableClassName?: string;
  loading?: boolean;
  error?: Error;
  retry?: () => void;
  /** Shown when the list loaded and has no rows ("No assets match these filters."). */
  empty: React.ReactNode;
  /** Attributes of each row (data-* for tests and styles). */
  rowProps?: (row: Row<T>) => React.HTMLAttributes<HTMLTableRowElement> & Record<`data-${string}`, string>;
  /** Below the table: pages, totals. */
  footer?: React.ReactNode;
}

/** Draws a TanStack table the caller set up (server-side sorting, selection): for lists with their own state. */
export function DataTableView<T>({ table, label, title, caption, bare, tableClassName, loading, error, retry, empty, rowProps, footer }: DataTableStates<T> & { table: Table<T> }) {
  const rows = table.getRowModel().rows;
  const titleId = useId();
  // A bare table sits inside a region that already names it; only a framed list is a region of its own.
  const Frame = bare ? "div" : "section";
  return (
    <Frame
      className={bare ? "overflow-x-auto" : "card overflow-x-auto"}
      aria-label={title || bare ? undefined : label}
      aria-labelledby={title ? titleId : undefined}
      aria-busy={loading || undefined}
    >
      {title && <h2 id={titleId} className="border-b border-rule px-3 py-2 text-lg font-bold">{label}</h2>}
      {loading && !rows.length && <Loading />}
      {error && <LoadError error={error} retry={retry} />}
      {!loading && !error && !rows.length && <p className="px-3 py-6 text-sm text-muted">{empty}</p>}
      {rows.length > 0 && (
        <table className={tableClassName ? `${STACKED_TABLE} ${tableClassName}` : STACKED_TABLE}>
          <caption className={caption ? "px-3 py-2 text-left text-sm font-bold" : "sr-only"}>{label}</caption>
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => <SortableHeader key={h.id} header={h} />)}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.map((row) => (
              <tr key={row.id} {...rowProps?.(row)}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} data-label={headerLabel(cell.column as Header<T, unknown>["column"])} className={cell.column.columnDef.meta?.cellClassName}>
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {footer}
    </Frame>
  );
}

/** A list sorted in the browser from its headers: for lists the server sends whole. */
export function DataTable<T>({
  data,
  columns,
  getRowId,
  initialSorting = [],
  sortable = true,
  ...states
}: DataTableStates<T> & {
  /** False for a list whose order is its meaning (the refill plan, soonest first). */
  sortable?: boolean;
  data: T[] | undefined;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- TanStack's own type for columns of mixed value types
  columns: ColumnDef<T, any>[];
  getRowId?: (row: T) => string; initialSorting?: SortingState }) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  // TanStack Table keeps its own state and hands out fresh functions each render; the compiler skips this component, as intended.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    // A fresh array each render: TanStack caches each row's values until its data changes, and an accessor
    // may read what the screen loaded beside the rows (a site's or asset's name arriving later). These
    // lists are not paged, so nothing is reset when the rows are rebuilt (a reset would render again, forever).
    data: data ? [...data] : [],
    autoResetAll: false,
    columns,
    getRowId,
    // The first click sorts ascending on every column (numbers and times too); a missing value (an
    // accessor's undefined) goes last whichever way the column is sorted.
    defaultColumn: { sortUndefined: "last", sortDescFirst: false },
    state: { sorting },
    enableSorting: sortable,
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return <DataTableView table={table} {...states} />;
}
