"use client";

import useSWR from "swr";
import Link from "next/link";
import { useSearchParams } from "next/navigation";
import { swrFetcher } from "@/lib/fetcher";
import { createColumnHelper } from "@tanstack/react-table";
import { SiteTime } from "@/components/ui/site-time";
import { DataTable } from "@/components/ui/data-table";

interface AuditPage {
  total: number;
  page: number;
  page_size: number;
  items: { id: number; at: string; actor: string; action: string; entity_type: string; entity_id: string | null; details: Record<string, unknown> }[];
}

type AuditEntry = AuditPage["items"][number];
const column = createColumnHelper<AuditEntry>();
const columns = [
  column.accessor("at", { header: "When", cell: (c) => <SiteTime at={c.getValue()} />, meta: { cellClassName: "figures whitespace-nowrap" } }),
  column.accessor("actor", { header: "Who" }),
  column.accessor("action", { header: "Action" }),
  column.accessor("entity_type", { header: "What" }),
  column.accessor((e) => JSON.stringify(e.details), { id: "details", header: "Details", enableSorting: false, cell: (c) => <span title={c.getValue()}>{c.getValue()}</span>, meta: { cellClassName: "max-w-md truncate text-muted" } }),
];

/** The audit log, newest first, a page at a time; a page's rows sort from the headers. */
export function AuditLogTable() {
  const params = useSearchParams();
  const page = Math.max(1, Number(params.get("page") ?? 1) || 1);
  const { data, error, isLoading, mutate } = useSWR<AuditPage>(`/api/audit?page=${page}`, swrFetcher, { refreshInterval: 15000 });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.page_size)) : 1;
  return (
    <DataTable
      data={data?.items}
      columns={columns}
      getRowId={(e) => String(e.id)}
      label="Audit log"
      loading={isLoading}
      error={error}
      retry={() => mutate()}
      empty="Nothing recorded yet."
      footer={
        data && (
          <nav aria-label="Pages" className="flex items-center gap-3 p-3 text-sm">
            <span className="figures">Page {data.page} of {pages}</span>
            {page > 1 && <Link className="btn-quiet md:h-8" href={`?page=${page - 1}`}>Previous</Link>}
            {page < pages && <Link className="btn-quiet md:h-8" href={`?page=${page + 1}`}>Next</Link>}
          </nav>
        )
      }
    />
  );
}
