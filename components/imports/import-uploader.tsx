"use client";

import { useState } from "react";
import useSWR, { mutate } from "swr";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { formatBytes } from "@/lib/csv/parse";
import type { AssetJson } from "@/lib/services/assets";
import type { DeviceJson } from "@/lib/services/devices";
import type { SiteJson } from "@/lib/services/sites";
import type { UploadJson } from "@/lib/services/imports";
import { IMPORT_KIND_LABELS, IMPORT_KINDS, importColumns, MAX_UPLOAD_BYTES, type ImportKind, type ImportMode } from "@/lib/validations/import";
import { UPLOAD_HISTORY_URL } from "@/components/imports/import-history";
import { ImportProgress } from "@/components/imports/import-progress";

const EXAMPLE_VALUES: Record<string, string> = {
  seq: "1042",
  at: "2026-03-14T06:30:00Z",
  channel: "0",
  echo_us: "5831.5",
  ticks: "11663",
  overflows: "0",
  pulse_us: "5800",
  high_us: "412.0",
  period_us: "1000.0",
  air_temp_c: "11.5",
  battery_v: "3.71",
  rssi_dbm: "-87",
  level_m: "1.250",
  volume_l: "3750",
  note: "tape",
};

interface Target {
  id: string;
  label: string;
}

function useTargets(kind: ImportKind): { targets: Target[] | undefined; devices: DeviceJson[] | undefined; error: Error | undefined } {
  const target = IMPORT_KIND_LABELS[kind].target;
  const devices = useSWR<{ items: DeviceJson[] }>(target === "device" ? "/api/devices" : null, swrFetcher);
  const tanks = useSWR<{ items: AssetJson[] }>(target === "tank" ? "/api/assets?kind=tank" : null, swrFetcher);
  const sites = useSWR<{ items: SiteJson[] }>("/api/sites", swrFetcher);
  const siteName = (id: string) => sites.data?.items.find((s) => s.id === id)?.name ?? "";
  if (target === "device") return { targets: devices.data?.items.map((d) => ({ id: d.id, label: `${d.name} (${d.serial}) · ${siteName(d.site_id)}` })), devices: devices.data?.items, error: devices.error };
  if (target === "tank") return { targets: tanks.data?.items.map((a) => ({ id: a.id, label: `${a.name} · ${siteName(a.site_id)}` })), devices: undefined, error: tanks.error };
  return { targets: sites.data?.items.map((s) => ({ id: s.id, label: s.name })), devices: undefined, error: sites.error };
}

/** Choose what to import and where, pick the CSV, and watch the server read it. */
export function ImportUploader() {
  const [kind, setKind] = useState<ImportKind>("readings");
  const [targetId, setTargetId] = useState("");
  const [file, setFile] = useState<File | null>(null);
  const [goodRows, setGoodRows] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [uploadId, setUploadId] = useState<string | null>(null);
  const [sentFile, setSentFile] = useState<File | null>(null);
  const [busy, setBusy] = useState(false);
  const { targets, devices, error } = useTargets(kind);
  const profile = devices?.find((d) => d.id === targetId)?.profile;
  const columns = importColumns(kind, profile);
  const targetWord = IMPORT_KIND_LABELS[kind].target;

  async function send(chosen: File, mode: ImportMode, target: string, what: ImportKind) {
    setProblem(null);
    if (chosen.size === 0) return setProblem("The file is empty.");
    if (chosen.size > MAX_UPLOAD_BYTES) return setProblem(`The file is ${formatBytes(chosen.size)}; an import takes at most ${formatBytes(MAX_UPLOAD_BYTES)}. Split it into smaller files.`);
    setBusy(true);
    try {
      const created = await fetchJson<UploadJson>("/api/imports", {
        method: "POST",
        body: JSON.stringify({ kind: what, target_id: target, file_name: chosen.name, size_bytes: chosen.size, mode }),
      });
      setUploadId(created.id);
      setSentFile(chosen);
      void mutate(UPLOAD_HISTORY_URL);
      // The file goes as the raw body; the progress panel polls the upload meanwhile.
      const res = await fetch(`/api/imports/${created.id}/file`, { method: "PUT", headers: { "content-type": "text/csv" }, body: chosen });
      if (!res.ok) {
        const body = await res.json().catch(() => null);
        setProblem(body?.message ?? `The server answered ${res.status}.`);
      }
    } catch (err) {
      setProblem((err as Error).message);
    } finally {
      setBusy(false);
      void mutate(UPLOAD_HISTORY_URL);
    }
  }

  function submit(e: React.FormEvent) {
    e.preventDefault();
    if (!targetId) return setProblem(`Choose the ${targetWord} to import into.`);
    if (!file) return setProblem("Choose a CSV file.");
    void send(file, goodRows ? "good_rows" : "all_or_nothing", targetId, kind);
  }

  return (
    <div className="space-y-4">
      <form onSubmit={submit} noValidate className="card space-y-4 p-4" aria-labelledby="import-form-title">
        <h2 id="import-form-title" className="text-lg font-bold">Import a CSV file</h2>
        <fieldset>
          <legend className="label">What the file holds</legend>
          <div className="flex flex-wrap gap-x-6 gap-y-2">
            {IMPORT_KINDS.map((k) => (
              <label key={k} className="flex items-center gap-2 text-sm">
                <input
                  type="radio"
                  name="import-kind"
                  value={k}
                  checked={kind === k}
                  onChange={() => {
                    setKind(k);
                    setTargetId("");
                  }}
                />
                {IMPORT_KIND_LABELS[k].title}
              </label>
            ))}
          </div>
          <p className="mt-1 text-xs text-muted">{IMPORT_KIND_LABELS[kind].hint}</p>
        </fieldset>
        <div>
          <label htmlFor="import-target" className="label">
            {targetWord === "device" ? "Device" : targetWord === "tank" ? "Tank" : "Site"}
          </label>
          <select id="import-target" className="field" value={targetId} onChange={(e) => setTargetId(e.target.value)}>
            <option value="">{targets ? `Choose a ${targetWord}` : "Loading…"}</option>
            {targets?.map((t) => <option key={t.id} value={t.id}>{t.label}</option>)}
          </select>
          {error && <p className="field-error">Could not load the list: {error.message}</p>}
        </div>
        <div className="text-sm">
          <p>
            <span className="font-bold">Columns: </span>
            <code className="figures">{columns.required.join(",")}</code>
            {columns.optional.length > 0 && (
              <>
                {" "}optional <code className="figures">{columns.optional.join(",")}</code>
              </>
            )}
            {kind === "readings" && !profile && <span className="text-muted"> (the signal columns follow the device&apos;s profile)</span>}
          </p>
          <p className="text-muted">
            Comma-separated, UTF-8, a header line first; times in ISO 8601 with a zone, decimals with a point. For example:{" "}
            <code className="figures">{columns.required.map((c) => EXAMPLE_VALUES[c] ?? "").join(",")}</code>
          </p>
        </div>
        <div>
          <label htmlFor="import-file" className="label">CSV file</label>
          <input id="import-file" type="file" accept=".csv,text/csv" className="field" onChange={(e) => setFile(e.target.files?.[0] ?? null)} aria-describedby="import-file-hint" />
          <p id="import-file-hint" className="mt-1 text-xs text-muted">At most {formatBytes(MAX_UPLOAD_BYTES)}.</p>
        </div>
        <label className="flex items-start gap-2 text-sm">
          <input type="checkbox" className="mt-1" checked={goodRows} onChange={(e) => setGoodRows(e.target.checked)} />
          <span>
            Import the good rows even if some lines have errors.
            <span className="block text-xs text-muted">Otherwise a file with any error imports nothing, and the errors are listed by line.</span>
          </span>
        </label>
        {problem && (
          <p role="alert" className="border-l-4 border-critical bg-card px-3 py-2 text-sm">
            {problem}
          </p>
        )}
        <button type="submit" className="btn" disabled={busy}>{busy ? "Importing…" : "Upload and import"}</button>
      </form>
      {uploadId && (
        <ImportProgress
          key={uploadId}
          uploadId={uploadId}
          onImportGoodRows={(u) => {
            if (sentFile) void send(sentFile, "good_rows", u.target_id, u.kind);
          }}
        />
      )}
    </div>
  );
}
