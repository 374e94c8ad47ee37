"use client";

import useSWR from "swr";
import { useState } from "react";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { formatBytes } from "@/lib/csv/parse";
import type { ImportQuestion, UploadJson } from "@/lib/services/imports";
import { IMPORT_KIND_LABELS } from "@/lib/validations/import";
import { Loading, LoadError } from "@/components/ui/data-state";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";

const RUNNING = new Set(["waiting", "processing"]);

type LineError = NonNullable<UploadJson["errors"]>[number];
const errorColumn = createColumnHelper<LineError>();
const errorColumns = [
  errorColumn.accessor("line", { header: "Line", meta: { cellClassName: "figures" } }),
  errorColumn.accessor("message", { header: "What is wrong" }),
];

/** The upload's state in words with a glyph; colour only when something is wrong. */
export function UploadStatusText({ upload }: { upload: Pick<UploadJson, "status" | "error_count"> }) {
  switch (upload.status) {
    case "waiting":
      return <span>waiting for the file</span>;
    case "processing":
      return <span>reading…</span>;
    case "imported":
      return <span>imported</span>;
    case "partial":
      return (
        <span className="text-medium">
          good rows imported, {upload.error_count} skipped
        </span>
      );
    case "rejected":
      return (
        <span className="font-bold text-critical">
          rejected, nothing imported
        </span>
      );
  }
}

/** Values stored as written but questioned ("looks like °F?"): the operator reads one as °F, or keeps it. */
function ImportQuestions({ upload, onChanged }: { upload: UploadJson; onChanged: () => void }) {
  const [busy, setBusy] = useState<number | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const questions = upload.questions ?? [];
  if (questions.length === 0) return null;
  async function readAsFahrenheit(q: ImportQuestion) {
    setBusy(q.line);
    setProblem(null);
    try {
      await fetchJson(`/api/imports/${upload.id}/read-as-fahrenheit`, { method: "POST", body: JSON.stringify({ lines: [q.line] }) });
      onChanged();
    } catch (err) {
      setProblem((err as Error).message);
    } finally {
      setBusy(null);
    }
  }
  return (
    <div className="space-y-2" data-testid="import-questions">
      <p className="text-sm font-bold">
        <span aria-hidden="true">■ </span>Questions: stored as written; change what you know is wrong
      </p>
      <ul className="space-y-2 text-sm">
        {questions.map((q) => (
          <li key={`${q.line ?? "file"}-${q.message}`} className="border-l-4 border-medium bg-paper px-3 py-2">
            {q.line !== null && <span className="figures">Line {q.line}: </span>}
            {q.message}
            {q.converted_at && <span className="font-bold"> Read as °F: stored as {q.as_celsius?.toFixed(1)}{"\u00a0"}°C.</span>}
            {q.line !== null && q.looks_like_fahrenheit && !q.converted_at && (
              <button type="button" className="btn-quiet ml-2" disabled={busy !== null} onClick={() => readAsFahrenheit(q)}>
                {busy === q.line ? "Storing…" : `Read as °F (${q.as_celsius?.toFixed(1)}\u00a0°C)`}
              </button>
            )}
          </li>
        ))}
      </ul>
      {problem && <p role="alert" className="field-error">{problem}</p>}
    </div>
  );
}

/**
 * One upload as the server reports it, polled while the file is read: a progress bar over the bytes
 * read, the lines and rows so far, then the outcome and the errors by line.
 */
export function ImportProgress({ uploadId, onImportGoodRows }: { uploadId: string; onImportGoodRows?: (upload: UploadJson) => void }) {
  const { data, error, isLoading, mutate } = useSWR<UploadJson>(`/api/imports/${uploadId}`, swrFetcher, {
    refreshInterval: (latest) => (latest && !RUNNING.has(latest.status) ? 0 : 400),
  });
  if (isLoading) return <Loading label="Starting the upload…" />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;
  const running = RUNNING.has(data.status);
  const pct = data.size_bytes > 0 ? Math.min(100, Math.round((100 * data.bytes_read) / data.size_bytes)) : 0;
  const shown = running ? pct : 100;
  const canRetryGoodRows = !running && data.status === "rejected" && data.mode === "all_or_nothing" && data.rows_valid > 0 && data.error_count > 0;

  return (
    <section aria-labelledby={`upload-${data.id}-title`} className="card space-y-3 p-4" data-testid="upload-progress">
      <h3 id={`upload-${data.id}-title`} className="font-bold">
        {IMPORT_KIND_LABELS[data.kind].title}: {data.file_name} → {data.target_label}
      </h3>
      <div>
        <div
          role="progressbar"
          aria-label="Lines read"
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={shown}
          aria-valuetext={`${shown} % of ${formatBytes(data.size_bytes)} read`}
          className="h-3 w-full overflow-hidden rounded border border-rule bg-paper"
        >
          <div className="h-full bg-liquid transition-[width]" style={{ width: `${shown}%` }} />
        </div>
        <p className="figures mt-1 text-sm" aria-live="polite">
          {formatBytes(running ? data.bytes_read : data.size_bytes)} of {formatBytes(data.size_bytes)} · {data.lines_read} lines · {data.rows_valid} good rows · {data.error_count} errors
        </p>
      </div>
      <p role={running ? undefined : "status"} className="text-sm">
        <span className="font-bold">State: </span>
        <UploadStatusText upload={data} />
        {data.message && <span> — {data.message}</span>}
      </p>
      {canRetryGoodRows && onImportGoodRows && (
        <button type="button" className="btn-quiet" onClick={() => onImportGoodRows(data)}>
          Import the {data.rows_valid} good rows only
        </button>
      )}
      {!running && <ImportQuestions upload={data} onChanged={() => mutate()} />}
      {data.errors && data.errors.length > 0 && (
        <DataTable
          data={data.errors}
          columns={errorColumns}
          label={`Errors by line${data.error_count > data.errors.length ? ` (the first ${data.errors.length} of ${data.error_count})` : ""}`}
          caption
          bare
          empty="No errors."
        />
      )}
    </section>
  );
}
