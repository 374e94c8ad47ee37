"use client";

import Link from "next/link";
import { useState } from "react";
import useSWR, { useSWRConfig } from "swr";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import type { AssetChannel, DipJson } from "@/lib/services/dips";
import type { CalibrationChangeJson, CalibrationChannelJson, CalibrationPreviewJson } from "@/lib/services/calibration";
import { Loading, LoadError } from "@/components/ui/data-state";
import { DataTable } from "@/components/ui/data-table";
import { createColumnHelper } from "@tanstack/react-table";
import { DipForm } from "@/components/assets/dip-form";
import { DipTable } from "@/components/assets/dip-table";
import { SiteTime } from "@/components/ui/site-time";
import { CalibrationPreview, formatOffsetMm, formatScale } from "@/components/calibration/calibration-preview";
import { SelectField, TextAreaField } from "@/components/ui/form-fields";

interface DipsResponse {
  asset: { id: string; name: string; kind: string; site_id: string; site_time_zone: string; mount_height_m: number | null; tank_height_m: number | null; max_dip_level_m: number | null };
  channels: AssetChannel[];
  channel_id: string | null;
  items: DipJson[];
}

interface CalibrationResponse {
  channel: CalibrationChannelJson;
  history: CalibrationChangeJson[];
}

const historyColumn = createColumnHelper<CalibrationChangeJson>();

function CalibrationHistory({ channelId, zone }: { channelId: string; zone: string }) {
  const { data, error, isLoading, mutate } = useSWR<CalibrationResponse>(`/api/channels/${channelId}/calibration`, swrFetcher, { refreshInterval: 60000 });
  const columns = [
    historyColumn.accessor((h) => new Date(h.at).getTime(), { id: "at", header: "When", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: { cellClassName: "figures" } }),
    historyColumn.accessor("by", { header: "By" }),
    historyColumn.accessor((h) => h.after.offset_m, { id: "offset", header: "Offset before → after", cell: (c) => `${formatOffsetMm(c.row.original.before.offset_m)} → ${formatOffsetMm(c.row.original.after.offset_m)}`, meta: { cellClassName: "figures" } }),
    historyColumn.accessor((h) => h.after.scale, { id: "scale", header: "Scale before → after", cell: (c) => `${formatScale(c.row.original.before.scale)} → ${formatScale(c.row.original.after.scale)}`, meta: { cellClassName: "figures" } }),
    historyColumn.accessor("rms_after_m", { header: "RMS after", cell: (c) => `${(c.getValue() * 1000).toFixed(1)}\u00a0mm`, meta: { cellClassName: "figures" } }),
    historyColumn.accessor((h) => h.dip_ids.length, {
      id: "dips",
      header: "Dips",
      cell: (c) => <>{c.getValue()}{c.row.original.mode === "offset_only" ? <span className="font-sans"> · offset only</span> : null}</>,
      meta: { cellClassName: "figures" },
    }),
    historyColumn.accessor((h) => h.note ?? "", { id: "note", header: "Note", enableSorting: false }),
  ];
  return (
    <section aria-labelledby="history-title" className="space-y-2">
      <h2 id="history-title" className="text-lg font-bold">Calibration history</h2>
      {data && (
        <p className="text-sm text-muted" data-testid="current-calibration">
          Now: offset <span className="figures">{formatOffsetMm(data.channel.calibration_offset_m)}</span>, scale{" "}
          <span className="figures">{formatScale(data.channel.calibration_scale)}</span>.
        </p>
      )}
      <DataTable
        data={data?.history}
        columns={columns}
        getRowId={(h) => h.id}
        initialSorting={[{ id: "at", desc: true }]}
        label="Calibration changes, newest first"
        loading={isLoading}
        error={error}
        retry={() => mutate()}
        empty="Never calibrated from dips."
      />
    </section>
  );
}

/** A tank's dips beside its sensor, the dip form, and the calibration from chosen dips: preview, then apply. */
export function CalibrationWorkbench({ assetId, canRecord, canApply }: { assetId: string; canRecord: boolean; canApply: boolean }) {
  const [channelId, setChannelId] = useState<string | null>(null);
  const url = `/api/assets/${assetId}/dips${channelId ? `?channel_id=${channelId}` : ""}`;
  const { data, error, isLoading, mutate } = useSWR<DipsResponse>(url, swrFetcher, { refreshInterval: 30000 });
  const { mutate: revalidate } = useSWRConfig();
  const [selected, setSelected] = useState<Set<string>>(new Set());
  const [preview, setPreview] = useState<CalibrationPreviewJson | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [note, setNote] = useState("");
  const [busy, setBusy] = useState<"preview" | "apply" | null>(null);
  const activeChannel = data?.channel_id ?? null;

  function toggle(id: string) {
    setPreview(null);
    setDone(null);
    setSelected((prev) => {
      const next = new Set(prev);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });
  }

  async function runPreview() {
    if (!activeChannel) return;
    setBusy("preview");
    setProblem(null);
    setDone(null);
    try {
      setPreview(await fetchJson<CalibrationPreviewJson>(`/api/channels/${activeChannel}/calibration/preview`, { method: "POST", body: JSON.stringify({ dip_ids: [...selected] }) }));
    } catch (err) {
      setPreview(null);
      setProblem((err as Error).message);
    } finally {
      setBusy(null);
    }
  }

  async function apply() {
    if (!activeChannel || !preview) return;
    setBusy("apply");
    setProblem(null);
    try {
      await fetchJson(`/api/channels/${activeChannel}/calibration`, { method: "POST", body: JSON.stringify({ dip_ids: [...selected], note: note.trim() || undefined }) });
      setDone(`Calibration applied: offset ${formatOffsetMm(preview.proposed.offset_m)}, scale ${formatScale(preview.proposed.scale)}. The channel's measurements are being recomputed.`);
      setPreview(null);
      setSelected(new Set());
      setNote("");
      await Promise.all([mutate(), revalidate(`/api/channels/${activeChannel}/calibration`)]);
    } catch (err) {
      setProblem((err as Error).message);
    } finally {
      setBusy(null);
    }
  }

  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;
  const usable = data.items.filter((d) => d.sensor !== null && d.void === null).length;

  return (
    <div className="space-y-6">
      {data.channels.length > 1 && (
        <SelectField id="calibration-channel" label="Channel" value={activeChannel ?? ""} onChange={(e) => { setChannelId(e.target.value); setSelected(new Set()); setPreview(null); }} className="max-w-sm">
          {data.channels.map((c) => <option key={c.id} value={c.id}>{c.device_name} · channel {c.index}</option>)}
        </SelectField>
      )}
      {data.channels.length === 0 && <p className="card px-3 py-3 text-sm">No channel measures this tank yet; dips can be recorded, but there is nothing to calibrate.</p>}

      {canRecord && <DipForm assetId={assetId} maxLevelM={data.asset.max_dip_level_m} onRecorded={() => mutate()} />}

      <section aria-labelledby="dips-title" className="card overflow-x-auto">
        <div className="flex flex-wrap items-center gap-3 px-3 pt-3">
          <h2 id="dips-title" className="text-lg font-bold">Dips beside the sensor</h2>
          <Link href={`/assets/${assetId}`} className="ml-auto text-sm underline">Tank trend</Link>
        </div>
        <p className="px-3 pt-1 text-sm text-muted">The sensor&apos;s level is its valid measurement nearest each dip&apos;s time, within an hour.</p>
        <DipTable
          dips={data.items}
          selected={selected}
          onToggle={toggle}
          selectable={canApply && !!activeChannel}
          zone={data.asset.site_time_zone}
          canVoid={canRecord}
          onVoided={() => {
            setPreview(null);
            mutate();
          }}
        />
      </section>

      {canApply && activeChannel && (
        <section aria-labelledby="calibrate-title" className="card space-y-4 p-4">
          <h2 id="calibrate-title" className="text-lg font-bold">Calibrate from dips</h2>
          <p className="text-sm text-muted">
            Choose two or more dips above ({selected.size} chosen of {usable} with a sensor reading). Dips far apart in level fit both offset and scale; dips close together fit the offset only.
          </p>
          <button type="button" className="btn-quiet" onClick={runPreview} disabled={selected.size < 2 || busy !== null}>
            {busy === "preview" ? "Fitting…" : "Preview calibration"}
          </button>
          {problem && (
            <p role="alert" className="border-l-4 border-critical bg-card px-3 py-2 text-sm">
              {problem}
            </p>
          )}
          {preview && (
            <>
              <CalibrationPreview preview={preview} zone={data.asset.site_time_zone} />
              <TextAreaField id="calibration-note" label="Note for the history" rows={2} value={note} onChange={(e) => setNote(e.target.value)} />
              <button type="button" className="btn" onClick={apply} disabled={busy !== null}>
                {busy === "apply" ? "Applying…" : "Apply calibration"}
              </button>
            </>
          )}
          {done && <p role="status" className="text-sm">{done}</p>}
        </section>
      )}

      {activeChannel && <CalibrationHistory key={`${activeChannel}-${done ?? ""}`} channelId={activeChannel} zone={data.asset.site_time_zone} />}
    </div>
  );
}
