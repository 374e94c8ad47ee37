// Maintenance of a whole device or site (lib/alarms/maintenance.ts): shelve, or take out of service,
// every alarm it covers until an expiry, with a reason. Starting one applies the inputs to the covered
// alarms with their events and one audit row; the worker's cycle ends windows at their expiry
// (out-of-service members return to service; shelved ones come back by their own shelve expiry).
// `members` lists every alarm the window changed (shelved or taken out of service); an alarm raised in
// its scope while it is in force joins it (coverAlarmsRaisedInMaintenance).

import type { Transaction } from "sequelize";
import { getSequelize } from "../db/sequelize";
import { sqlRows } from "../db/sql";
import { AppError, notFound } from "../errors";
import { applyAlarmInput, type EngineEvent } from "../alarms/engine";
import { type MaintenanceProblem, type MaintenanceStep, type MaintenanceWindow, MAX_OUT_OF_SERVICE_DAYS, MIN_REASON_LENGTH, maintenanceEndInputs, maintenanceProblems, maintenanceStartInputs } from "../alarms/maintenance";
import { MAX_SHELVE_HOURS } from "../alarms/engine";
import type { MaintenanceInput } from "../validations/alarm";
import { type AlarmDbRow, type AlarmRowExtras, type EventToWrite, insertAlarmEvents, saveAlarm, toRecord } from "./alarm-store";
import { type Actor, writeAudit } from "./audit";

const PROBLEM_FIELDS: Record<MaintenanceProblem, [field: string, message: string]> = {
  reason_missing: ["reason", `Give a reason a colleague can act on (at least ${MIN_REASON_LENGTH} characters).`],
  until_not_after_from: ["until", "The window must end in the future."],
  shelve_too_long: ["until", `Shelving lasts at most ${MAX_SHELVE_HOURS} h; take the equipment out of service for longer work.`],
  out_of_service_too_long: ["until", `Out of service lasts at most ${MAX_OUT_OF_SERVICE_DAYS} days.`],
};

interface WindowRow {
  id: string;
  organisation_id: string;
  site_id: string;
  device_id: string | null;
  mode: "shelve" | "out_of_service";
  reason: string;
  starts_at: Date;
  until: Date;
  members: string[];
}

const asWindow = (w: WindowRow): MaintenanceWindow => ({
  scope: w.device_id ? "device" : "site",
  scopeId: w.device_id ?? w.site_id,
  mode: w.mode,
  from: w.starts_at,
  until: w.until,
  reason: w.reason,
});

const maintainable = (r: AlarmDbRow) => ({ id: r.id, siteId: r.site_id, deviceIds: r.device_id ? [r.device_id] : [], state: r.state });

/** Applies the steps to their alarms; returns the ids that changed. */
async function applySteps(rows: readonly AlarmDbRow[], steps: readonly MaintenanceStep[], at: Date, actor: Actor, extras: (s: MaintenanceStep) => AlarmRowExtras, transaction: Transaction): Promise<string[]> {
  const byId = new Map(rows.map((r) => [r.id, r]));
  const events: EventToWrite[] = [];
  const changed: string[] = [];
  for (const step of steps) {
    const row = byId.get(step.alarmId);
    if (!row) continue;
    const applied = applyAlarmInput(toRecord(row), step.input, { at, cause: step.cause });
    if (!applied.ok || applied.result.events.length === 0) continue;
    await saveAlarm(row.id, applied.result.record, extras(step), transaction);
    changed.push(row.id);
    events.push(...applied.result.events.map((event: EngineEvent) => ({ alarmId: row.id, organisationId: row.organisation_id, event, userId: actor.userId, actorLabel: actor.label })));
  }
  await insertAlarmEvents(events, transaction);
  return changed;
}

/** Starts a maintenance window on a device or a site of the actor's organisation. */
export async function startMaintenance(actor: Actor, scope: { kind: "device" | "site"; id: string }, input: MaintenanceInput, now = new Date()) {
  const [target] = await sqlRows<{ site_id: string }>(
    scope.kind === "device"
      ? `SELECT site_id FROM devices WHERE id = :id AND organisation_id = :org`
      : `SELECT id AS site_id FROM sites WHERE id = :id AND organisation_id = :org`,
    { id: scope.id, org: actor.organisationId },
  );
  if (!target) throw notFound(scope.kind === "device" ? "That device" : "That site");
  const window: MaintenanceWindow = { scope: scope.kind, scopeId: scope.id, mode: input.mode, from: now, until: input.until, reason: input.reason };
  const problems = maintenanceProblems(window);
  if (problems.length) {
    const fields = Object.fromEntries(problems.map((p) => PROBLEM_FIELDS[p]));
    throw new AppError("invalid", Object.values(fields).join(" "), { fields });
  }
  return getSequelize().transaction(async (transaction) => {
    const rows = await sqlRows<AlarmDbRow>(
      `SELECT * FROM alarms WHERE organisation_id = :org AND ${scope.kind === "device" ? "device_id" : "site_id"} = :id ORDER BY id FOR UPDATE`,
      { org: actor.organisationId, id: scope.id },
      { transaction },
    );
    const steps = maintenanceStartInputs(window, rows.map(maintainable), now);
    const reason = input.reason.trim();
    const changed = await applySteps(rows, steps, now, actor, (s) => (s.input.type === "shelve" ? { shelveReason: reason } : { outOfServiceReason: reason, shelveReason: null }), transaction);
    const [created] = await sqlRows<{ id: string }>(
      `INSERT INTO maintenance_windows (organisation_id, site_id, device_id, mode, reason, starts_at, until, members, created_by)
       VALUES (:org, :siteId, :deviceId, :mode, :reason, :from, :until, CAST(:members AS uuid[]), :userId) RETURNING id`,
      {
        org: actor.organisationId,
        siteId: target.site_id,
        deviceId: scope.kind === "device" ? scope.id : null,
        mode: input.mode,
        reason,
        from: now,
        until: input.until,
        members: `{${changed.join(",")}}`,
        userId: actor.userId,
      },
      { transaction },
    );
    await writeAudit(actor, `${scope.kind}.maintenance`, { type: scope.kind, id: scope.id }, { window: created.id, mode: input.mode, until: input.until.toISOString(), reason, alarms: changed.length }, transaction);
    return { id: created.id, scope: scope.kind, scope_id: scope.id, mode: input.mode, reason, from: now.toISOString(), until: input.until.toISOString(), alarms_changed: changed.length };
  });
}

/**
 * An alarm row that did not exist when its window started (a device that falls silent during the very
 * work raises a new device alarm) is covered by the window in force over its device or site. SQL
 * condition over `alarms` aliased `al`; notice planning uses it too, so no such alarm is e-mailed
 * between its creation and the cycle that covers it.
 */
export const RAISED_IN_MAINTENANCE = `EXISTS (
  SELECT 1 FROM maintenance_windows mw
  WHERE mw.ended_at IS NULL AND mw.starts_at <= :now AND mw.until > :now AND mw.organisation_id = al.organisation_id
    AND (CASE WHEN mw.device_id IS NULL THEN mw.site_id = al.site_id ELSE mw.device_id = al.device_id END)
    AND al.created_at >= mw.starts_at AND NOT (al.id = ANY(mw.members)))`;

/** The worker's cycle: windows in force take in the alarms raised in their scope since they started. */
export async function coverAlarmsRaisedInMaintenance(now: Date, transaction: Transaction): Promise<number> {
  // Windows before alarms, the order endMaintenanceWindows locks them in.
  const windows = await sqlRows<WindowRow>(
    `SELECT id, organisation_id, site_id, device_id, mode, reason, starts_at, until, members FROM maintenance_windows
     WHERE ended_at IS NULL AND starts_at <= :now AND until > :now ORDER BY id FOR UPDATE`,
    { now },
    { transaction },
  );
  if (windows.length === 0) return 0;
  const rows = await sqlRows<AlarmDbRow>(
    `SELECT al.* FROM alarms al WHERE al.state NOT IN ('shelved', 'out_of_service') AND ${RAISED_IN_MAINTENANCE} ORDER BY al.id FOR UPDATE`,
    { now },
    { transaction },
  );
  if (rows.length === 0) return 0;
  const worker: Actor = { organisationId: "", userId: null, label: "worker" };
  let covered = 0;
  for (const w of windows) {
    const inScope = rows.filter((r) => r.organisation_id === w.organisation_id && r.created_at >= w.starts_at && (w.device_id ? r.device_id === w.device_id : r.site_id === w.site_id));
    const steps = maintenanceStartInputs(asWindow(w), inScope.map(maintainable), now);
    const reason = w.reason.trim();
    const changed = await applySteps(inScope, steps, now, worker, (s) => (s.input.type === "shelve" ? { shelveReason: reason } : { outOfServiceReason: reason, shelveReason: null }), transaction);
    if (changed.length) {
      await sqlRows(`UPDATE maintenance_windows SET members = members || CAST(:ids AS uuid[]) WHERE id = :id RETURNING id`, { id: w.id, ids: `{${changed.join(",")}}` }, { transaction });
    }
    covered += changed.length;
  }
  return covered;
}

/** The worker's cycle: windows past their expiry return their out-of-service alarms and are closed. */
export async function endMaintenanceWindows(now: Date, transaction: Transaction): Promise<number> {
  const due = await sqlRows<WindowRow>(
    `SELECT id, organisation_id, site_id, device_id, mode, reason, starts_at, until, members FROM maintenance_windows
     WHERE ended_at IS NULL AND until <= :now ORDER BY id FOR UPDATE SKIP LOCKED`,
    { now },
    { transaction },
  );
  if (due.length === 0) return 0;
  const memberIds = due.flatMap((w) => w.members);
  const rows = memberIds.length
    ? await sqlRows<AlarmDbRow>(`SELECT * FROM alarms WHERE id = ANY(CAST(:ids AS uuid[])) ORDER BY id FOR UPDATE`, { ids: `{${memberIds.join(",")}}` }, { transaction })
    : [];
  const worker: Actor = { organisationId: "", userId: null, label: "worker" };
  for (const w of due) {
    const steps = maintenanceEndInputs(asWindow(w), w.members, rows.map(maintainable), now);
    await applySteps(rows, steps, w.until, worker, () => ({ outOfServiceReason: null }), transaction);
  }
  await sqlRows(`UPDATE maintenance_windows SET ended_at = :now WHERE id = ANY(CAST(:ids AS uuid[])) RETURNING id`, { now, ids: `{${due.map((w) => w.id).join(",")}}` }, { transaction });
  return due.length;
}
