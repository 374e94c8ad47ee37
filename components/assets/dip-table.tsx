"use client";

import { useState } from "react";
import type { DipJson } from "@/lib/services/dips";
import { useFigures } from "@/components/ui/display-settings";
import { createColumnHelper } from "@tanstack/react-table";
import { SiteTime, useTimeDisplay } from "@/components/ui/site-time";
import { formatDateTime } from "@/lib/format/time";
import { DataTable } from "@/components/ui/data-table";
import { fetchJson } from "@/lib/fetcher";
import { voidDipSchema, type VoidDipInput } from "@/lib/validations/dip";
import { applyApiErrors, InputField } from "@/components/ui/form-fields";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";

const MINUS = "\u2212";

/** A signed difference in millimetres: "+12.3 mm", "−4.0 mm". */
export function formatSignedMm(m: number | null | undefined): string {
  if (m == null || !Number.isFinite(m)) return "—";
  const mm = m * 1000;
  const text = Math.abs(mm).toFixed(1);
  return `${Number(text) === 0 ? "±" : mm > 0 ? "+" : MINUS}${text}\u00a0mm`;
}

const column = createColumnHelper<DipJson>();

/** Asks why, then voids one dip: it stays in the list, struck through with the reason. */
function VoidDipForm({ dip, label, onDone, onCancel }: { dip: DipJson; label: string; onDone: () => void; onCancel: () => void }) {
  const fig = useFigures();
  const form = useForm<VoidDipInput>({ resolver: zodResolver(voidDipSchema), defaultValues: { reason: "" } });
  const { register, handleSubmit, formState: { errors, isSubmitting } } = form;
  const onSubmit = handleSubmit(async (input) => {
    try {
      await fetchJson(`/api/dips/${dip.id}/void`, { method: "POST", body: JSON.stringify(input) });
      onDone();
    } catch (err) {
      applyApiErrors(form, err);
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3 border-t border-rule px-3 py-3" aria-label={`Void the dip of ${label}`}>
      <p className="text-sm">
        Void the dip of <span className="figures">{label}</span> ({fig.length(dip.level_m)})? It stays listed, struck through, and no longer counts for
        calibration or drift.
      </p>
      <InputField id="void-reason" label="Why is it void?" {...register("reason")} error={errors.reason?.message} hint="Wrong tank, wrong time, misread tape…" required />
      {errors.root && <p role="alert" className="field-error">{errors.root.message}</p>}
      <div className="flex gap-3">
        <button type="submit" className="btn" disabled={isSubmitting}>{isSubmitting ? "Voiding…" : "Void the dip"}</button>
        <button type="button" className="btn-quiet" onClick={onCancel}>Keep it</button>
      </div>
    </form>
  );
}

/** Dips with the sensor's level at their time; a checkbox per dip chooses it for a calibration; a voided dip is struck through with its reason. */
export function DipTable({
  dips,
  selected,
  onToggle,
  selectable,
  zone,
  canVoid = false,
  onVoided,
}: {
  dips: DipJson[];
  selected: ReadonlySet<string>;
  onToggle: (id: string) => void;
  selectable: boolean;
  zone: string;
  canVoid?: boolean;
  onVoided?: () => void;
}) {
  const time = useTimeDisplay(zone);
  const fig = useFigures();
  const [voiding, setVoiding] = useState<DipJson | null>(null);
  const struck = (d: DipJson) => (d.void ? "line-through text-muted" : undefined);
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
                disabled={d.sensor === null || d.void !== null}
                onChange={() => onToggle(d.id)}
                aria-label={`Use the dip of ${formatDateTime(d.at, time)} (${fig.length(d.level_m)})`}
              />
            ),
          }),
        ]
      : []),
    column.accessor((d) => new Date(d.at).getTime(), { id: "time", header: "Time", cell: (c) => <span className={struck(c.row.original)}><SiteTime at={c.row.original.at} zone={zone} /></span>, meta: { cellClassName: "figures" } }),
    column.accessor("level_m", { header: "Dipped level", cell: (c) => <span className={struck(c.row.original)}>{fig.length(c.getValue())}</span>, meta: { cellClassName: "figures" } }),
    column.accessor((d) => d.sensor?.level_m, {
      id: "sensor",
      header: "Sensor level then",
      cell: (c) => (c.row.original.sensor ? fig.length(c.row.original.sensor.level_m) : <span className="font-sans text-muted">no reading within an hour</span>),
      meta: { cellClassName: "figures" },
    }),
    column.accessor("difference_m", { header: "Sensor − dip", cell: (c) => <span className={struck(c.row.original)}>{formatSignedMm(c.getValue())}</span>, meta: { cellClassName: "figures" } }),
    column.accessor((d) => d.by ?? "—", { id: "by", header: "By" }),
    column.accessor((d) => d.note ?? "", {
      id: "note",
      header: "Note",
      enableSorting: false,
      cell: ({ row: { original: d } }) => (
        <>
          {d.note ?? ""}
          {d.void && (
            <span className="block text-sm" data-testid="dip-void">
              <span aria-hidden="true">⊘ </span>Void: {d.void.reason}
              {d.void.by ? ` (${d.void.by})` : ""}
            </span>
          )}
        </>
      ),
    }),
    ...(canVoid
      ? [
          column.display({
            id: "void",
            header: "Void",
            meta: { label: "Void" },
            cell: ({ row: { original: d } }) =>
              d.void ? null : (
                <button type="button" className="btn-quiet" onClick={() => setVoiding(d)} aria-label={`Void the dip of ${formatDateTime(d.at, time)}`}>
                  Void…
                </button>
              ),
          }),
        ]
      : []),
  ];
  return (
    <>
      <DataTable
        data={dips}
        columns={columns}
        getRowId={(d) => d.id}
        label="Dip list"
        empty="No dips recorded for this tank yet."
        rowProps={(row) => ({ "data-void": row.original.void ? "true" : "false" })}
      />
      {voiding && (
        <VoidDipForm
          key={voiding.id}
          dip={voiding}
          label={formatDateTime(voiding.at, time)}
          onCancel={() => setVoiding(null)}
          onDone={() => {
            setVoiding(null);
            onVoided?.();
          }}
        />
      )}
    </>
  );
}
