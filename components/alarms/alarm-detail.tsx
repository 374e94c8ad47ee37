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
import { STACKED_TABLE } from "@/components/ui/form-fields";
import { AlarmStateLabel, alarmFigure, alarmWhere } from "@/components/alarms/alarm-badges";
import { useFigures } from "@/components/ui/display-settings";
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

      <section className="card overflow-x-auto" aria-labelledby="alarm-events-title">
        <h2 id="alarm-events-title" className="px-3 pt-3 text-lg font-bold">Events</h2>
        <table className={STACKED_TABLE}>
          <thead>
            <tr><th scope="col">When</th><th scope="col">Event</th><th scope="col">State</th><th scope="col">Cause</th><th scope="col">Value</th><th scope="col">Setpoint</th><th scope="col">Who</th><th scope="col">Comment</th></tr>
          </thead>
          <tbody>
            {data.events.map((e) => (
              <tr key={e.id}>
                <td data-label="When" className="figures whitespace-nowrap"><SiteTime at={e.at} zone={zone} /></td>
                <td data-label="Event">{e.kind.replaceAll("_", " ")}</td>
                <td data-label="State" className="whitespace-nowrap">{e.from_state && e.to_state ? `${ALARM_STATE_WORDS[e.from_state]} → ${ALARM_STATE_WORDS[e.to_state]}` : "—"}</td>
                <td data-label="Cause">{e.cause}</td>
                <td data-label="Value" className="figures whitespace-nowrap">{alarmFigure(fig, e.value, data.unit, data.kind)}</td>
                <td data-label="Setpoint" className="figures whitespace-nowrap">{alarmFigure(fig, e.setpoint, data.unit, data.kind)}</td>
                <td data-label="Who">{e.actor_label ?? "—"}</td>
                <td data-label="Comment">{e.comment ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section className="card overflow-x-auto" aria-labelledby="alarm-notices-title">
        <h2 id="alarm-notices-title" className="px-3 pt-3 text-lg font-bold">E-mails</h2>
        {data.notifications.length === 0 ? (
          <p className="px-3 py-4 text-sm text-muted">No e-mail has been sent about this alarm.</p>
        ) : (
          <table className={STACKED_TABLE}>
            <thead>
              <tr><th scope="col">To</th><th scope="col">Why</th><th scope="col">Delivery</th><th scope="col">Link used</th><th scope="col">Link expires</th></tr>
            </thead>
            <tbody>
              {data.notifications.map((n) => (
                <tr key={n.id}>
                  <td data-label="To">{n.email ?? "on-call person"} <span className="text-muted">(on call #{n.position})</span></td>
                  <td data-label="Why">{n.reason === "escalation" ? "Escalation" : "First notice"}</td>
                  <td data-label="Delivery"><NoticeDelivery notice={n} timeZone={data.site.time_zone} /></td>
                  <td data-label="Link used" className="figures"><SiteTime at={n.used_at} zone={zone} /></td>
                  <td data-label="Link expires" className="figures"><SiteTime at={n.expires_at} zone={zone} /></td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

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
