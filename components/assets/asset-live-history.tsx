"use client";

import { createColumnHelper } from "@tanstack/react-table";
import type { AssetOverviewJson } from "@/lib/read-models/overview-asset";
import { isAlarmKind, isLevelAlarmKind } from "@/lib/alarms/engine";
import { formatDuration } from "@/components/fleet/fleet-figures";
import { useFigures } from "@/components/ui/display-settings";
import { FlagTag } from "@/components/fleet/fleet-status";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { alarmStateWord } from "@/lib/alarms/vocabulary";
import { DataTable } from "@/components/ui/data-table";
import { SiteTime } from "@/components/ui/site-time";

// How the asset got here: its alarm history, the health flags of the period, its manual dips and its
// calibration changes, each a kit table under its heading.

// Only level alarms carry a value in metres; health alarms carry counts or seconds.
const isLevel = (kind: string) => isAlarmKind(kind) && isLevelAlarmKind(kind);
const instant = (at: string | null) => (at ? Date.parse(at) : undefined);
const TIME_CELL = { cellClassName: "figures whitespace-nowrap" };

type AlarmEvent = AssetOverviewJson["alarm_history"][number];
type Flag = AssetOverviewJson["flags"][number];
type Dip = AssetOverviewJson["dips"][number];
type CalibrationChange = AssetOverviewJson["calibrations"][number];

const alarmColumn = createColumnHelper<AlarmEvent>();

function changeOf(e: AlarmEvent): string {
  return e.from_state && e.to_state && e.from_state !== e.to_state ? `${alarmStateWord(e.from_state)} → ${alarmStateWord(e.to_state)}` : e.kind.replace(/_/g, " ");
}

export function AlarmHistory({ events, zone }: { events: AlarmEvent[]; zone: string }) {
  const fig = useFigures();
  const columns = [
    alarmColumn.accessor((e) => instant(e.at), { id: "when", header: "When", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: TIME_CELL }),
    alarmColumn.accessor("alarm_label", { header: "Alarm", cell: (c) => <>{c.row.original.priority && <PriorityBadge priority={c.row.original.priority} />} {c.getValue()}</> }),
    alarmColumn.accessor(changeOf, {
      id: "change",
      header: "Change",
      enableSorting: false,
      cell: (c) => <>{c.getValue()}{c.row.original.comment && <span className="block text-xs text-muted">“{c.row.original.comment}”</span>}</>,
    }),
    alarmColumn.accessor((e) => (isLevel(e.alarm_kind) ? (e.value ?? undefined) : undefined), {
      id: "value",
      header: "Value",
      cell: ({ row: { original: e } }) => (
        <>
          {e.value != null && isLevel(e.alarm_kind) ? fig.length(e.value) : "—"}
          {e.setpoint != null && isLevel(e.alarm_kind) && <span className="text-muted"> / {fig.length(e.setpoint)}</span>}
        </>
      ),
      meta: { cellClassName: "figures" },
    }),
    alarmColumn.accessor((e) => e.actor_label ?? e.cause, { id: "by", header: "By", cell: (c) => c.row.original.actor_label ?? <span className="text-muted">{c.row.original.cause}</span> }),
  ];
  return <DataTable data={events} columns={columns} getRowId={(e) => String(e.id)} label="Alarm history" title empty="No alarm has changed state on this asset yet." />;
}

const flagColumn = createColumnHelper<Flag>();

export function FlagHistory({ flags, now, zone }: { flags: Flag[]; now: number; zone: string }) {
  const lastedS = (f: Flag) => ((f.cleared_at ? Date.parse(f.cleared_at) : now) - Date.parse(f.since)) / 1000;
  const columns = [
    flagColumn.accessor("flag", { header: "Flag", cell: (c) => <FlagTag flag={c.getValue()} /> }),
    flagColumn.accessor((f) => instant(f.since), { id: "since", header: "Since", cell: (c) => <SiteTime at={c.row.original.since} zone={zone} />, meta: TIME_CELL }),
    flagColumn.accessor((f) => instant(f.cleared_at), {
      id: "cleared",
      header: "Cleared",
      cell: (c) => (c.row.original.cleared_at ? <span className="figures"><SiteTime at={c.row.original.cleared_at} zone={zone} /></span> : <span className="font-bold">still open</span>),
      meta: { cellClassName: "whitespace-nowrap" },
    }),
    flagColumn.accessor(lastedS, { id: "lasted", header: "Lasted", cell: (c) => formatDuration(c.getValue()), meta: { cellClassName: "figures" } }),
    flagColumn.accessor((f) => f.magnitude ?? undefined, { id: "magnitude", header: "Magnitude", cell: (c) => (c.getValue() !== undefined ? Number(c.getValue()?.toPrecision(3)) : "—"), meta: { cellClassName: "figures" } }),
  ];
  return <DataTable data={flags} columns={columns} getRowId={(f) => String(f.id)} label="Sensor health in this period" title empty="No sensor fault in this period." />;
}

const dipColumn = createColumnHelper<Dip>();

export function DipList({ dips, zone }: { dips: Dip[]; zone: string }) {
  const fig = useFigures();
  const columns = [
    dipColumn.accessor((d) => instant(d.at), { id: "when", header: "When", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: TIME_CELL }),
    dipColumn.accessor("level_m", { header: "Dipped level", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
    dipColumn.accessor((d) => d.measured_level_m ?? undefined, { id: "sensor", header: "Sensor then", cell: (c) => fig.length(c.getValue()), meta: { cellClassName: "figures" } }),
    dipColumn.accessor((d) => d.residual_m ?? undefined, {
      id: "residual",
      header: "Sensor − dip",
      cell: (c) => (c.getValue() !== undefined ? `${((c.getValue() as number) * 1000).toFixed(1)}\u00a0mm` : "—"),
      meta: { cellClassName: "figures" },
    }),
    dipColumn.accessor((d) => d.by_name ?? "—", { id: "by", header: "By", cell: (c) => <>{c.getValue()}{c.row.original.note && <span className="block text-xs text-muted">{c.row.original.note}</span>}</> }),
  ];
  return <DataTable data={dips} columns={columns} getRowId={(d) => String(d.id)} label="Manual dips in this period" title empty="No manual dip in this period." />;
}

const calibrationColumn = createColumnHelper<CalibrationChange>();

export function CalibrationList({ changes, zone }: { changes: CalibrationChange[]; zone: string }) {
  const fig = useFigures();
  const columns = [
    calibrationColumn.accessor((c) => instant(c.at), { id: "when", header: "When", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: TIME_CELL }),
    calibrationColumn.display({ id: "offset", header: "Offset", cell: ({ row: { original: c } }) => `${fig.length(c.before_offset_m)} → ${fig.length(c.after_offset_m)}`, meta: { cellClassName: "figures" } }),
    calibrationColumn.display({ id: "scale", header: "Scale", cell: ({ row: { original: c } }) => `${c.before_scale.toFixed(5)} → ${c.after_scale.toFixed(5)}`, meta: { cellClassName: "figures" } }),
    calibrationColumn.accessor("rms_after_m", { header: "Residual after (RMS)", cell: (c) => `${(c.getValue() * 1000).toFixed(1)}\u00a0mm`, meta: { cellClassName: "figures" } }),
    calibrationColumn.accessor("by_label", { header: "By", cell: (c) => <>{c.getValue()}{c.row.original.note && <span className="block text-xs text-muted">{c.row.original.note}</span>}</> }),
  ];
  return <DataTable data={changes} columns={columns} getRowId={(c) => String(c.id)} label="Calibration changes in this period" title empty="No calibration change in this period." />;
}
