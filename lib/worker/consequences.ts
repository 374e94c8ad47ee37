// The database side of consequential alarms (lib/alarms/consequential.ts), per site: builds each
// device's conditions (silence judged by when readings ARRIVED, open health flags), plans which device
// and common-cause alarms are active and which channel and level alarms are suppressed by design,
// and writes the difference as state changes with their events. Runs in the alarm stage before a
// batch's condition changes are applied, so a condition seen from a silent or faulty sensor is logged,
// not annunciated. Set-based: a handful of statements per call, whatever the number of alarms.

import type { Transaction } from "sequelize";
import { DEFAULT_PRIORITIES, isLevelAlarmKind, type AlarmKind } from "../alarms/engine";
import { type DeviceConditions, type OpenFlag, followCondition, planConsequences, reconcileSuppression, targetKey } from "../alarms/consequential";
import { OFFLINE_AFTER_INTERVALS } from "../alarms/late-history";
import type { HealthFlagKind } from "../health/flags";
import { type AlarmDbRow, toRecord } from "../services/alarm-store";
import { type StageCounts, type StageUpdate, saveStageUpdates } from "./alarm-evaluation";
import { sqlRows } from "../db/sql";

interface DeviceDbRow {
  id: string;
  organisation_id: string;
  site_id: string;
  name: string;
  site_name: string;
  silent_since: Date | null;
}

interface ChannelDbRow {
  id: string;
  device_id: string;
  asset_id: string | null;
  label: string;
  flags: { flag: HealthFlagKind; since: string }[] | null;
}

/** The sites of the given channels (the batch's). */
export async function sitesOfChannels(channelIds: readonly string[], transaction: Transaction): Promise<string[]> {
  if (channelIds.length === 0) return [];
  const rows = await sqlRows<{ site_id: string }>(
    `SELECT DISTINCT d.site_id FROM channels ch JOIN devices d ON d.id = ch.device_id WHERE ch.id = ANY($1::uuid[])`,
    [channelIds],
    { transaction },
  );
  return rows.map((r) => r.site_id);
}

/**
 * Brings the sites' device, common-cause and suppressed alarms in line with their devices' conditions
 * at `now`. `siteIds` null: every site with a device (the worker's cycle).
 */
export async function applyConsequences(siteIds: readonly string[] | null, now: Date, transaction: Transaction): Promise<StageCounts> {
  const sites = siteIds ?? (await sqlRows<{ site_id: string }>(`SELECT DISTINCT site_id FROM devices`, [], { transaction })).map((r) => r.site_id);
  if (sites.length === 0) return { alarmsEvaluated: 0, events: 0 };
  const sorted = [...new Set(sites)].sort();
  // One writer per site at a time, taken in site order by every alarm-stage transaction (batch and cycle).
  await sqlRows(`SELECT pg_advisory_xact_lock(hashtext('alarm-site:' || s)) FROM unnest($1::text[]) AS s ORDER BY s`, [sorted], { transaction });

  const devices = await sqlRows<DeviceDbRow>(
    `SELECT d.id, d.organisation_id, d.site_id, d.name, s.name AS site_name,
            CASE WHEN coalesce(d.last_seen_at, d.created_at) + make_interval(secs => $2 * d.expected_interval_s) < $3
                 THEN coalesce(d.last_seen_at, d.created_at) + make_interval(secs => $2 * d.expected_interval_s) END AS silent_since
     FROM devices d JOIN sites s ON s.id = d.site_id WHERE d.site_id = ANY($1::uuid[]) ORDER BY d.id`,
    [sorted, OFFLINE_AFTER_INTERVALS, now],
    { transaction },
  );
  const channels = await sqlRows<ChannelDbRow>(
    `SELECT ch.id, ch.device_id, ch.asset_id, coalesce(a.name, d.name || ' channel ' || ch.index) AS label,
            (SELECT json_agg(json_build_object('flag', f.flag, 'since', f.since)) FROM health_flags f WHERE f.channel_id = ch.id AND f.cleared_at IS NULL) AS flags
     FROM channels ch JOIN devices d ON d.id = ch.device_id LEFT JOIN assets a ON a.id = ch.asset_id
     WHERE d.site_id = ANY($1::uuid[]) ORDER BY ch.device_id, ch.index`,
    [sorted],
    { transaction },
  );
  const channelsOf = new Map<string, ChannelDbRow[]>();
  for (const c of channels) channelsOf.set(c.device_id, [...(channelsOf.get(c.device_id) ?? []), c]);
  const conditions: DeviceConditions[] = devices.map((d) => ({
    deviceId: d.id,
    siteId: d.site_id,
    label: d.name,
    silentSince: d.silent_since,
    channels: (channelsOf.get(d.id) ?? []).map((c) => ({
      channelId: c.id,
      assetId: c.asset_id,
      label: c.label,
      openFlags: (c.flags ?? []).map((f): OpenFlag => ({ flag: f.flag, since: f.since })),
    })),
  }));
  const siteName = new Map(devices.map((d) => [d.site_id, d.site_name]));
  const plans = sorted.map((siteId) => planConsequences(conditions.filter((c) => c.siteId === siteId), siteName.get(siteId)));
  const suppressions = new Map(plans.flatMap((p) => [...p.suppressions]));
  const deviceOffline = plans.flatMap((p) => p.deviceOffline);
  const causes = plans.flatMap((p) => p.commonCauses);
  const deviceOf = new Map(devices.map((d) => [d.id, d]));

  // Rows the plan needs: a device alarm per silent device, a common-cause alarm per cause, and the
  // channel alarms it suppresses (so a flag raised while suppressed is logged on a suppressed alarm).
  const silent = deviceOffline.filter((o) => o.active).map((o) => deviceOf.get(o.deviceId) as DeviceDbRow);
  if (silent.length) {
    await sqlRows(
      `INSERT INTO alarms (organisation_id, site_id, device_id, kind, priority, cause_key)
       SELECT d.organisation_id, d.site_id, d.id, 'device_offline', $2, 'device:' || d.id || ':offline' FROM devices d WHERE d.id = ANY($1::uuid[])
       ON CONFLICT (device_id) WHERE kind = 'device_offline' DO NOTHING RETURNING id`,
      [silent.map((d) => d.id), DEFAULT_PRIORITIES.device_offline],
      { transaction },
    );
  }
  if (causes.length) {
    await sqlRows(
      `INSERT INTO alarms (organisation_id, site_id, device_id, kind, priority, cause_key, members)
       SELECT s.organisation_id, s.id, v.device_id, 'common_cause', $4, v.cause_key, v.members
       FROM unnest($1::uuid[], $2::uuid[], $3::text[], $5::jsonb[]) AS v(site_id, device_id, cause_key, members) JOIN sites s ON s.id = v.site_id
       ON CONFLICT (organisation_id, cause_key) WHERE kind = 'common_cause' DO UPDATE SET members = excluded.members RETURNING id`,
      [causes.map((c) => c.siteId), causes.map((c) => (c.scope === "device" ? c.scopeId : null)), causes.map((c) => c.key), DEFAULT_PRIORITIES.common_cause, causes.map((c) => JSON.stringify(c.members))],
      { transaction },
    );
  }
  const channelTargets = [...suppressions.values()].flatMap((s) => (s.target.scope === "channel" ? [s.target] : []));
  if (channelTargets.length) {
    await sqlRows(
      `INSERT INTO alarms (organisation_id, site_id, asset_id, channel_id, device_id, kind, priority)
       SELECT d.organisation_id, d.site_id, ch.asset_id, v.channel_id, d.id, v.kind, v.priority
       FROM unnest($1::uuid[], $2::text[], $3::text[]) AS v(channel_id, kind, priority)
       JOIN channels ch ON ch.id = v.channel_id JOIN devices d ON d.id = ch.device_id
       ON CONFLICT (channel_id, kind) WHERE channel_id IS NOT NULL DO NOTHING RETURNING id`,
      [channelTargets.map((t) => t.channelId), channelTargets.map((t) => t.kind), channelTargets.map((t) => DEFAULT_PRIORITIES[t.kind])],
      { transaction },
    );
  }
  const assetTargets = [...suppressions.values()].flatMap((s) => (s.target.scope === "asset" ? [s.target] : []));
  // What may change: device and group alarms, alarms the plan suppresses, and alarms suppressed now.
  const alarms = await sqlRows<AlarmDbRow>(
    `SELECT al.* FROM alarms al
     WHERE al.site_id = ANY($1::uuid[]) AND (
       al.kind IN ('device_offline', 'common_cause') OR al.state = 'suppressed_by_design'
       OR (al.channel_id, al.kind) IN (SELECT * FROM unnest($2::uuid[], $3::text[]))
       OR (al.channel_id IS NULL AND (al.asset_id, al.kind) IN (SELECT * FROM unnest($4::uuid[], $5::text[]))))
     ORDER BY al.id FOR UPDATE OF al`,
    [sorted, channelTargets.map((t) => t.channelId), channelTargets.map((t) => t.kind), assetTargets.map((t) => t.assetId), assetTargets.map((t) => t.kind)],
    { transaction },
  );

  const offlineOf = new Map(deviceOffline.map((o) => [o.deviceId, o]));
  const causeOf = new Map(causes.map((c) => [c.key, c]));
  const openFlagsOf = new Map(channels.map((c) => [c.id, new Set((c.flags ?? []).map((f) => f.flag))]));
  const updates: StageUpdate[] = [];
  for (const row of alarms) {
    const record = toRecord(row);
    if (row.kind === "device_offline") {
      const off = row.device_id ? offlineOf.get(row.device_id) : undefined;
      const active = off?.active ?? false;
      const r = followCondition(record, active, active && off?.since ? off.since : now, active ? (off?.cause ?? "device silent") : `${deviceOf.get(row.device_id ?? "")?.name ?? "device"} reporting again`);
      if (r.events.length) updates.push({ row, record: r.record, events: r.events, evalState: undefined, evaluatedUntil: now });
      continue;
    }
    if (row.kind === "common_cause") {
      const cause = row.cause_key ? causeOf.get(row.cause_key) : undefined;
      const r = followCondition(record, cause !== undefined, cause ? cause.since : now, cause ? cause.cause : "common cause ended: fewer channels flagged alike");
      if (r.events.length) updates.push({ row, record: r.record, events: r.events, evalState: undefined, evaluatedUntil: now });
      continue;
    }
    const key =
      row.channel_id !== null
        ? targetKey({ scope: "channel", channelId: row.channel_id, kind: row.kind as AlarmKind })
        : row.asset_id !== null
          ? targetKey({ scope: "asset", assetId: row.asset_id, kind: row.kind as AlarmKind })
          : null;
    if (key === null) continue;
    const suppression = suppressions.get(key);
    const step = reconcileSuppression(record, suppression, now);
    if (step.events.length === 0) continue;
    const update: StageUpdate = { row, record: step.record, events: step.events, evalState: undefined, evaluatedUntil: null, causeKey: suppression?.causeKey ?? null };
    if (step.restartEvaluation) {
      if (isLevelAlarmKind(row.kind)) update.evalState = { active: false, pendingSinceMs: null, lastAtMs: now.getTime() };
      else if (row.kind === "rate_of_change") update.evalState = { lastEvalAtMs: now.getTime(), active: false };
      // A flag alarm whose flag is still open is judged again from that flag; otherwise from now on.
      const stillFlagged = row.channel_id !== null && (openFlagsOf.get(row.channel_id)?.has(row.kind as HealthFlagKind) ?? false);
      if (stillFlagged) update.resetEvaluatedUntil = true;
      else update.evaluatedUntil = now;
    }
    updates.push(update);
  }
  return { alarmsEvaluated: updates.length, events: await saveStageUpdates(updates, transaction) };
}
