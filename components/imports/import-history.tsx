"use client";

import { useState } from "react";
import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { UploadJson } from "@/lib/services/imports";
import { IMPORT_KIND_LABELS } from "@/lib/validations/import";
import { createColumnHelper } from "@tanstack/react-table";
import { SiteTime } from "@/components/ui/site-time";
import { ImportProgress, UploadStatusText } from "@/components/imports/import-progress";
import { DataTable } from "@/components/ui/data-table";

export const UPLOAD_HISTORY_URL = "/api/imports";

const column = createColumnHelper<UploadJson>();

/** Every upload of the organisation, newest first; "Details" opens its errors by line. */
export function ImportHistory() {
  const { data, error, isLoading, mutate } = useSWR<{ items: UploadJson[] }>(UPLOAD_HISTORY_URL, swrFetcher, { refreshInterval: 10000 });
  const [open, setOpen] = useState<string | null>(null);
  const columns = [
    column.accessor((u) => new Date(u.created_at).getTime(), { id: "when", header: "When", cell: (c) => <SiteTime at={c.row.original.created_at} />, meta: { cellClassName: "figures" } }),
    column.accessor((u) => IMPORT_KIND_LABELS[u.kind].title, { id: "what", header: "What" }),
    column.accessor("target_label", { header: "Into" }),
    column.accessor("file_name", { header: "File", meta: { cellClassName: "break-all" } }),
    column.accessor("status", { header: "State", cell: (c) => <UploadStatusText upload={c.row.original} /> }),
    column.accessor("rows_imported", { header: "Rows imported", meta: { cellClassName: "figures" } }),
    column.accessor((u) => u.by ?? "—", { id: "by", header: "By" }),
    column.display({
      id: "details",
      header: () => <span className="sr-only">Details</span>,
      meta: { label: "Details" },
      cell: ({ row: { original: u } }) => (
        <button type="button" className="btn-quiet md:h-8" aria-expanded={open === u.id} onClick={() => setOpen(open === u.id ? null : u.id)}>
          {open === u.id ? "Hide" : "Details"}<span className="sr-only"> of {u.file_name}</span>
        </button>
      ),
    }),
  ];
  return (
    <section aria-labelledby="history-title" className="space-y-3">
      <h2 id="history-title" className="text-lg font-bold">Upload history</h2>
      <DataTable data={data?.items} columns={columns} getRowId={(u) => u.id} label="Uploads" loading={isLoading} error={error} retry={() => mutate()} empty="No uploads yet." />
      {open && <ImportProgress key={open} uploadId={open} />}
    </section>
  );
}
