"use client";

import Link from "next/link";
import useSWR from "swr";
import { useState } from "react";
import { can, type Role } from "@/lib/auth/permissions";
import { fetchJson, swrFetcher } from "@/lib/fetcher";
import { needsAcknowledgement } from "@/lib/alarms/engine";
import type { AlarmPriority, AlarmState } from "@/lib/alarms/state-machine";
import type { AlarmJson } from "@/lib/services/alarms";
import { Loading, LoadError } from "@/components/ui/data-state";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";
import { AlarmStateLabel, alarmFigure, alarmWhere } from "@/components/alarms/alarm-badges";
import { useFigures } from "@/components/ui/display-settings";
import type { Figures } from "@/lib/format/figures";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { ALARM_STATE_WORDS } from "@/lib/alarms/vocabulary";
import { SiteTime } from "@/components/ui/site-time";
import { AlarmActionDialog, type AlarmDialogMode } from "@/components/alarms/alarm-actions";
import { NoticeDelivery, type NoticeDeliveryJson } from "@/components/alarms/alarm-notice-delivery";

interface AlarmEventJson {
  id: number;
  at: string;
  kind: string;
  from_state: AlarmState | null;
  to_state: AlarmState | null;
  cause: string;
  value: number | null;
  setpoint: number | null;
  actor_label: string | null;
  comment: string | null;
}

interface NotificationJson extends NoticeDeliveryJson {
  id: string;
  episode: number;
  email: string | null;
  position: number;
  reason: string;
  expires_at: string;
  used_at: string | null;
}

type AlarmWithHistory = AlarmJson & { events: AlarmEventJson[]; notifications: NotificationJson[] };

const eventColumn = createColumnHelper<AlarmEventJson>();
const noticeColumn = createColumnHelper<NotificationJson>();
const instant = (at: string | null) => (at ? Date.parse(at) : undefined);

function eventColumns(alarm: AlarmWithHistory, zone: string, fig: Figures) {
  return [
    eventColumn.accessor((e) => instant(e.at), { id: "when", header: "When", cell: (c) => <SiteTime at={c.row.original.at} zone={zone} />, meta: { cellClassName: "figures whitespace-nowrap" } }),
    eventColumn.accessor((e) => e.kind.replaceAll("_", " "), { id: "event", header: "Event" }),
    eventColumn.accessor((e) => (e.from_state && e.to_state ? `${ALARM_STATE_WORDS[e.from_state]} → ${ALARM_STATE_WORDS[e.to_state]}` : "—"), { id: "state", header: "State", enableSorting: false, meta: { cellClassName: "whitespace-nowrap" } }),
    eventColumn.accessor("cause", { header: "Cause" }),
    eventColumn.accessor((e) => e.value ?? undefined, { id: "value", header: "Value", cell: (c) => alarmFigure(fig, c.row.original.value, alarm.unit, alarm.kind), meta: { cellClassName: "figures whitespace-nowrap" } }),
    eventColumn.accessor("setpoint", { header: "Setpoint", enableSorting: false, cell: (c) => alarmFigure(fig, c.getValue(), alarm.unit, alarm.kind), meta: { cellClassName: "figures whitespace-nowrap" } }),
    eventColumn.accessor((e) => e.actor_label ?? "—", { id: "who", header: "Who" }),
    eventColumn.accessor((e) => e.comment ?? "", { id: "comment", header: "Comment", enableSorting: false }),
  ];
}

function noticeColumns(zone: string) {
  return [
    noticeColumn.accessor((n) => n.email ?? "on-call person", { id: "to", header: "To", cell: (c) => <>{c.getValue()} <span className="text-muted">(on call #{c.row.original.position})</span></> }),
    noticeColumn.accessor((n) => (n.reason === "escalation" ? "Escalation" : "First notice"), { id: "why", header: "Why" }),
    noticeColumn.display({ id: "delivery", header: "Delivery", cell: (c) => <NoticeDelivery notice={c.row.original} timeZone={zone} /> }),
    noticeColumn.accessor((n) => instant(n.used_at), { id: "used", header: "Link used", cell: (c) => <SiteTime at={c.row.original.used_at} zone={zone} />, meta: { cellClassName: "figures" } }),
    noticeColumn.accessor((n) => instant(n.expires_at), { id: "expires", header: "Link expires", cell: (c) => <SiteTime at={c.row.original.expires_at} zone={zone} />, meta: { cellClassName: "figures" } }),
  ];
}

/** One alarm: what it is now, the actions the role allows, its events and the e-mails sent about it. */
export function AlarmDetail({ id, role }: { id: string; role: Role }) {
  const { data, error, isLoading, mutate } = useSWR<AlarmWithHistory>(`/api/alarms/${id}`, swrFetcher, { refreshInterval: 15_000 });
  const [dialog, setDialog] = useState<AlarmDialogMode | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const fig = useFigures();
  if (isLoading) return <Loading />;
  if (error) return <LoadError error={error} retry={() => mutate()} />;
  if (!data) return null;

  const state = data.state as AlarmState;
  const zone = data.site.time_zone;
  const what = `${data.label} at ${alarmWhere(data)}`;
  async function post(path: string) {
    setBusy(true);
    setProblem(null);
    try {
      await fetchJson(`/api/alarms/${id}/${path}`, { method: "POST", body: "{}" });
      await mutate();
    } catch (e) {
      setProblem((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="space-y-6">
      <section className="card grid gap-4 p-4 sm:grid-cols-4" aria-label="Now">
        <div><p className="label">Priority</p><PriorityBadge priority={data.priority as AlarmPriority} calm={state === "normal"} /></div>
        <div><p className="label">State</p><AlarmStateLabel state={state} awaitingReset={data.awaiting_reset} />{data.shelved_until && <p className="text-sm text-muted">until <SiteTime at={data.shelved_until} zone={zone} /> — {data.shelve_reason}</p>}</div>
        <div><p className="label">Value / setpoint</p><p className="figures">{alarmFigure(fig, data.value, data.unit, data.kind)}{data.setpoint !== null && <span className="text-muted"> / {alarmFigure(fig, data.setpoint, data.unit, data.kind)}</span>}</p></div>
        <div><p className="label">Condition</p><p>{data.condition_active ? "Active" : "Clear"}</p></div>
        <div><p className="label">Began</p><p className="figures"><SiteTime at={data.activated_at} zone={zone} /></p></div>
        <div><p className="label">Cleared</p><p className="figures"><SiteTime at={data.cleared_at} zone={zone} /></p></div>
        <div><p className="label">Acknowledged</p><p className="figures">{data.acknowledged_at ? <><SiteTime at={data.acknowledged_at} zone={zone} /> by {data.acknowledged_by?.email ?? (data.acknowledged_by?.name || "—")}</> : "—"}</p></div>
        <div><p className="label">Activations</p><p className="figures">{data.activations}</p></div>
        {data.out_of_service_reason && <div className="sm:col-span-4"><p className="label">Out of service because</p><p>{data.out_of_service_reason}</p></div>}
      </section>

      <div className="flex flex-wrap gap-3" role="group" aria-label="Actions">
        {can(role, "alarm:acknowledge") && needsAcknowledgement(state) && <button type="button" className="btn" onClick={() => setDialog("acknowledge")}>Acknowledge</button>}
        {can(role, "alarm:shelve") && !["shelved", "suppressed_by_design", "out_of_service"].includes(state) && <button type="button" className="btn-quiet" onClick={() => setDialog("shelve")}>Shelve for…</button>}
        {can(role, "alarm:shelve") && state === "shelved" && <button type="button" className="btn-quiet" disabled={busy} onClick={() => post("unshelve")}>Unshelve</button>}
        {can(role, "alarm:reset") && data.awaiting_reset && <button type="button" className="btn-quiet" disabled={busy} onClick={() => post("reset")}>Reset</button>}
        {can(role, "alarm:out_of_service") && state !== "out_of_service" && <button type="button" className="btn-quiet" onClick={() => setDialog("out_of_service")}>Take out of service</button>}
        {can(role, "alarm:out_of_service") && state === "out_of_service" && <button type="button" className="btn-quiet" disabled={busy} onClick={() => post("return-to-service")}>Return to service</button>}
        {data.asset && <Link className="btn-quiet" href={`/assets/${data.asset.id}`}>Open the asset</Link>}
        {data.asset && data.channel === null && <Link className="btn-quiet" href={`/alarms/setpoints/${data.asset.id}`}>Setpoints</Link>}
        <Link className="btn-quiet" href={`/alarms/on-call/${data.site.id}`}>On-call list</Link>
      </div>
      {problem && <p role="alert" className="field-error">{problem}</p>}

      <DataTable
        data={data.events}
        columns={eventColumns(data, zone, fig)}
        getRowId={(e) => String(e.id)}
        label="Events"
        title
        empty="No events recorded for this alarm yet."
      />

      <DataTable
        data={data.notifications}
        columns={noticeColumns(zone)}
        getRowId={(n) => n.id}
        label="E-mails"
        title
        empty="No e-mail has been sent about this alarm."
      />

      {dialog && (
        <AlarmActionDialog
          mode={dialog}
          ids={[id]}
          title={`${dialog === "acknowledge" ? "Acknowledge" : dialog === "shelve" ? "Shelve" : "Take out of service"} ${what}`}
          onClose={() => setDialog(null)}
          onDone={() => {
            setDialog(null);
            mutate();
          }}
        />
      )}
    </div>
  );
}
