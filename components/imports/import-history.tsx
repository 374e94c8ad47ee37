"use client";

import { useState } from "react";
import useSWR from "swr";
import { swrFetcher } from "@/lib/fetcher";
import type { UploadJson } from "@/lib/db/queries/imports";
import { IMPORT_KIND_LABELS } from "@/lib/validations/import";
import { Loading, LoadError } from "@/components/ui/data-state";
import { formatWhen } from "@/components/assets/dip-table";
import { ImportProgress, UploadStatusText } from "@/components/imports/import-progress";
import { STACKED_TABLE } from "@/components/ui/form-fields";

export const UPLOAD_HISTORY_URL = "/api/imports";

/** Every upload of the organisation, newest first; "Details" opens its errors by line. */
export function ImportHistory() {
  const { data, error, isLoading, mutate } = useSWR<{ items: UploadJson[] }>(UPLOAD_HISTORY_URL, swrFetcher, { refreshInterval: 10000 });
  const [open, setOpen] = useState<string | null>(null);
  return (
    <section aria-labelledby="history-title" className="space-y-3">
      <h2 id="history-title" className="text-lg font-bold">Upload history</h2>
      <div className="card overflow-x-auto">
        {isLoading && <Loading />}
        {error && <LoadError error={error} retry={() => mutate()} />}
        {data && data.items.length === 0 && <p className="px-3 py-6 text-sm text-muted">No uploads yet.</p>}
        {data && data.items.length > 0 && (
          <table className={STACKED_TABLE}>
            <thead>
              <tr>
                <th scope="col">When</th>
                <th scope="col">What</th>
                <th scope="col">Into</th>
                <th scope="col">File</th>
                <th scope="col">State</th>
                <th scope="col">Rows imported</th>
                <th scope="col">By</th>
                <th scope="col"><span className="sr-only">Details</span></th>
              </tr>
            </thead>
            <tbody>
              {data.items.map((u) => (
                <tr key={u.id}>
                  <td data-label="When" className="figures">{formatWhen(u.created_at)}</td>
                  <td data-label="What">{IMPORT_KIND_LABELS[u.kind].title}</td>
                  <td data-label="Into">{u.target_label}</td>
                  <td data-label="File" className="break-all">{u.file_name}</td>
                  <td data-label="State"><UploadStatusText upload={u} /></td>
                  <td data-label="Rows imported" className="figures">{u.rows_imported}</td>
                  <td data-label="By">{u.by ?? "—"}</td>
                  <td data-label="Details">
                    <button type="button" className="btn-quiet md:h-8" aria-expanded={open === u.id} onClick={() => setOpen(open === u.id ? null : u.id)}>
                      {open === u.id ? "Hide" : "Details"}<span className="sr-only"> of {u.file_name}</span>
                    </button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </div>
      {open && <ImportProgress key={open} uploadId={open} />}
    </section>
  );
}
