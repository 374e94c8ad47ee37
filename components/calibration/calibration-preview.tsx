"use client";

import type { CalibrationPreviewJson } from "@/lib/services/calibration";
import { CalibrationTrend } from "@/components/calibration/calibration-trend";
import { formatSignedMm } from "@/components/assets/dip-table";
import { SiteTime } from "@/components/ui/site-time";
import { STACKED_TABLE } from "@/components/ui/form-fields";

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
      {preview.proposed.note && (
        <p role="note" className="border-l-4 border-medium bg-card px-3 py-2 text-sm">
          {preview.proposed.note}
        </p>
      )}
      <table className="table-dense w-full">
        <caption className="sr-only">Calibration now and proposed</caption>
        <thead>
          <tr>
            <th scope="col">Figure</th>
            <th scope="col">Now</th>
            <th scope="col">Proposed</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.label}>
              <th scope="row" className="h-10 px-3 text-left text-sm font-normal">{r.label}</th>
              <td className="figures">{r.now}</td>
              <td className="figures font-bold">{r.proposed}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-muted">
        Distance from the face = scale × timed distance + offset − face offset; the level is the mounting height minus that distance. A least-squares
        line through the dips gives the offset and scale.
      </p>
      <table className={STACKED_TABLE}>
        <caption className="sr-only">Residuals per dip</caption>
        <thead>
          <tr>
            <th scope="col">Dip</th>
            <th scope="col">Dipped level</th>
            <th scope="col">Sensor − dip now</th>
            <th scope="col">Sensor − dip after</th>
          </tr>
        </thead>
        <tbody>
          {preview.residuals.map((r) => (
            <tr key={r.dip_id}>
              <td data-label="Dip" className="figures"><SiteTime at={r.at} zone={zone} /></td>
              <td data-label="Dipped level" className="figures">{r.dip_level_m.toFixed(3)}{"\u00a0"}m</td>
              <td data-label="Sensor − dip now" className="figures">{formatSignedMm(r.residual_before_m)}</td>
              <td data-label="Sensor − dip after" className="figures">{formatSignedMm(r.residual_after_m)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {preview.series.length > 0 ? (
        <CalibrationTrend series={preview.series.map((s) => ({ ...s, at: String(s.at) }))} dips={preview.dips.map((d) => ({ at: String(d.at), level_m: d.level_m }))} zone={zone} />
      ) : (
        <p className="text-sm text-muted">No valid measurements around the dips to draw.</p>
      )}
    </section>
  );
}
