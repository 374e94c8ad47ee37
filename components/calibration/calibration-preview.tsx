"use client";

import type { CalibrationPreviewJson } from "@/lib/services/calibration";
import { CalibrationTrend } from "@/components/calibration/calibration-trend";
import { formatSignedMm } from "@/components/assets/dip-table";
import { SiteTime } from "@/components/ui/site-time";
import { DataTable } from "@/components/ui/data-table";
import { createColumnHelper } from "@tanstack/react-table";

type Residual = CalibrationPreviewJson["residuals"][number];
interface FigureRow {
  label: string;
  now: string;
  proposed: string;
}
const residualColumn = createColumnHelper<Residual>();
const figureColumn = createColumnHelper<FigureRow>();
const FIGURE_COLUMNS = [
  figureColumn.accessor("label", { header: "Figure", enableSorting: false }),
  figureColumn.accessor("now", { header: "Now", enableSorting: false, meta: { cellClassName: "figures" } }),
  figureColumn.accessor("proposed", { header: "Proposed", enableSorting: false, cell: (c) => <span className="font-bold">{c.getValue()}</span>, meta: { cellClassName: "figures" } }),
];

export function formatScale(scale: number): string {
  return scale.toFixed(5);
}

export function formatOffsetMm(offsetM: number): string {
  return formatSignedMm(offsetM).replace("±", "");
}

/** What the chosen dips say: offset and scale now and proposed, residuals before and after, the trend both ways. */
export function CalibrationPreview({ preview, zone }: { preview: CalibrationPreviewJson; zone: string }) {
  const rows = [
    { label: "Offset", now: formatOffsetMm(preview.current.offset_m), proposed: formatOffsetMm(preview.proposed.offset_m) },
    { label: "Scale", now: formatScale(preview.current.scale), proposed: formatScale(preview.proposed.scale) },
    { label: "RMS of sensor − dip", now: `${(preview.rms_before_m * 1000).toFixed(1)}\u00a0mm`, proposed: `${(preview.rms_after_m * 1000).toFixed(1)}\u00a0mm` },
  ];
  return (
    <section aria-labelledby="preview-title" className="space-y-4" data-testid="calibration-preview">
      <h3 id="preview-title" className="font-bold">
        Preview from {preview.n} dips {preview.proposed.mode === "offset_only" ? "(offset only)" : "(offset and scale)"}
      </h3>
      <p className="text-sm" data-testid="calibration-spread">{preview.spread.sentence}</p>
      {preview.proposed.note && (
        <p role="note" className="border-l-4 border-medium bg-card px-3 py-2 text-sm">
          {preview.proposed.note}
        </p>
      )}
      <DataTable data={rows} columns={FIGURE_COLUMNS} getRowId={(r) => r.label} sortable={false} label="Calibration now and proposed" empty="" />
      <p className="text-xs text-muted">
        Distance from the face = scale × timed distance + offset − face offset; the level is the mounting height minus that distance. A least-squares
        line through the dips gives the offset and scale.
      </p>
      <DataTable
        data={preview.residuals}
        columns={[
          residualColumn.accessor((r) => new Date(r.at).getTime(), { id: "at", header: "Dip", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: { cellClassName: "figures" } }),
          residualColumn.accessor("dip_level_m", { header: "Dipped level", cell: (c) => `${c.getValue().toFixed(3)}\u00a0m`, meta: { cellClassName: "figures" } }),
          residualColumn.accessor("residual_before_m", { header: "Sensor − dip now", cell: (c) => formatSignedMm(c.getValue()), meta: { cellClassName: "figures" } }),
          residualColumn.accessor("residual_after_m", { header: "Sensor − dip after", cell: (c) => formatSignedMm(c.getValue()), meta: { cellClassName: "figures" } }),
        ]}
        getRowId={(r) => r.dip_id}
        initialSorting={[{ id: "at", desc: false }]}
        label="Residuals per dip"
        empty="No dips chosen."
      />
      {preview.series.length > 0 ? (
        <CalibrationTrend series={preview.series.map((s) => ({ ...s, at: String(s.at) }))} dips={preview.dips.map((d) => ({ at: String(d.at), level_m: d.level_m }))} zone={zone} />
      ) : (
        <p className="text-sm text-muted">No valid measurements around the dips to draw.</p>
      )}
    </section>
  );
}
