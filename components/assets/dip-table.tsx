"use client";

import type { DipJson } from "@/lib/db/queries/dips";
import { formatMetres } from "@/components/fleet/fleet-figures";
import { STACKED_TABLE } from "@/components/ui/form-fields";

const MINUS = "\u2212";

/** A signed difference in millimetres: "+12.3 mm", "−4.0 mm". */
export function formatSignedMm(m: number | null | undefined): string {
  if (m == null || !Number.isFinite(m)) return "—";
  const mm = m * 1000;
  const text = Math.abs(mm).toFixed(1);
  return `${Number(text) === 0 ? "±" : mm > 0 ? "+" : MINUS}${text}\u00a0mm`;
}

export function formatWhen(at: string | Date): string {
  return new Date(at).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });
}

/** Dips with the sensor's level at their time; a checkbox per dip chooses it for a calibration. */
export function DipTable({ dips, selected, onToggle, selectable }: { dips: DipJson[]; selected: ReadonlySet<string>; onToggle: (id: string) => void; selectable: boolean }) {
  if (dips.length === 0) return <p className="px-3 py-6 text-sm text-muted">No dips recorded for this tank yet.</p>;
  return (
    <table className={STACKED_TABLE}>
      <caption className="sr-only">Manual dips beside the sensor</caption>
      <thead>
        <tr>
          {selectable && <th scope="col">Use</th>}
          <th scope="col">Time</th>
          <th scope="col">Dipped level</th>
          <th scope="col">Sensor level then</th>
          <th scope="col">Sensor − dip</th>
          <th scope="col">By</th>
          <th scope="col">Note</th>
        </tr>
      </thead>
      <tbody>
        {dips.map((d) => (
          <tr key={d.id}>
            {selectable && (
              <td data-label="Use">
                <input
                  type="checkbox"
                  className="h-5 w-5"
                  checked={selected.has(d.id)}
                  disabled={d.sensor === null}
                  onChange={() => onToggle(d.id)}
                  aria-label={`Use the dip of ${formatWhen(d.at)} (${d.level_m.toFixed(3)} m)`}
                />
              </td>
            )}
            <td data-label="Time" className="figures">{formatWhen(d.at)}</td>
            <td data-label="Dipped level" className="figures">{formatMetres(d.level_m)}</td>
            <td data-label="Sensor level then" className="figures">
              {d.sensor ? formatMetres(d.sensor.level_m) : <span className="font-sans text-muted">no reading within an hour</span>}
            </td>
            <td data-label="Sensor − dip" className="figures">{formatSignedMm(d.difference_m)}</td>
            <td data-label="By">{d.by ?? "—"}</td>
            <td data-label="Note">{d.note ?? ""}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
