"use client";

import type { DipJson } from "@/lib/services/dips";
import { useFigures } from "@/components/ui/display-settings";
import { createColumnHelper } from "@tanstack/react-table";
import { SiteTime, useTimeDisplay } from "@/components/ui/site-time";
import { formatDateTime } from "@/lib/format/time";
import { DataTable } from "@/components/ui/data-table";

const MINUS = "\u2212";

/** A signed difference in millimetres: "+12.3 mm", "−4.0 mm". */
export function formatSignedMm(m: number | null | undefined): string {
  if (m == null || !Number.isFinite(m)) return "—";
  const mm = m * 1000;
  const text = Math.abs(mm).toFixed(1);
  return `${Number(text) === 0 ? "±" : mm > 0 ? "+" : MINUS}${text}\u00a0mm`;
}

const column = createColumnHelper<DipJson>();

/** Dips with the sensor's level at their time; a checkbox per dip chooses it for a calibration. */
export function DipTable({ dips, selected, onToggle, selectable, zone }: { dips: DipJson[]; selected: ReadonlySet<string>; onToggle: (id: string) => void; selectable: boolean; zone: string }) {
  const time = useTimeDisplay(zone);
  const fig = useFigures();
  const columns = [
    ...(selectable
      ? [
          column.display({
            id: "use",
            header: "Use",
            cell: ({ row: { original: d } }) => (
              <input
                type="checkbox"
                className="h-5 w-5"
                checked={selected.has(d.id)}
                disabled={d.sensor === null}
                onChange={() => onToggle(d.id)}
                aria-label={`Use the dip of ${formatDateTime(d.at, time)} (${fig.length(d.level_m)})`}
              />
            ),
          }),
        ]
      : []),
    column.accessor((d) => new Date(d.at).getTime(), { id: "time", header: "Time", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: { cellClassName: "figures" } }),
    column.accessor("level_m", { header: "Dipped level", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor((d) => d.sensor?.level_m ?? null, {
      id: "sensor",
      header: "Sensor level then",
      sortUndefined: "last",
      cell: (c) => (c.row.original.sensor ? fig.length(c.row.original.sensor.level_m) : <span className="font-sans text-muted">no reading within an hour</span>),
      meta: { cellClassName: "figures" },
    }),
    column.accessor("difference_m", { header: "Sensor − dip", cell: (c) => formatSignedMm(c.getValue()), meta: { cellClassName: "figures" } }),
    column.accessor((d) => d.by ?? "—", { id: "by", header: "By" }),
    column.accessor((d) => d.note ?? "", { id: "note", header: "Note", enableSorting: false }),
  ];
  return <DataTable data={dips} columns={columns} getRowId={(d) => d.id} label="Dip list" empty="No dips recorded for this tank yet." />;
}
