// Calibrating a channel from manual dips: pair each chosen dip with the channel's raw distance at its
// time, fit offset and scale (lib/calibration/fit), preview the trend as it is and as it would be, and
// apply: the channel's calibration changes, the change is kept with its residuals, the channel's
// measurements are recomputed and the action is audited, all in one transaction.

import { personLabel, siteScope, wholeOrganisation, type Scope } from "../db/site-scope";
import type { Transaction } from "sequelize";
import { writeAudit, type Actor } from "./audit";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import {
  fitCalibration,
  levelFromRaw,
  residualsUnder,
  trueDistanceFromDip,
  undoCalibration,
  type Calibration,
  type CalibrationFit,
  spreadSentence,
  type CalibrationPoint,
} from "../calibration/fit";
import { dipsWithSensor, type DipJson } from "./dips";
import { requestRecompute } from "./recompute-requests";
import type { CalibrationRequest } from "../validations/calibration";
import { sqlRows, sqlRun } from "../db/sql";

interface ChannelRow {
  id: string;
  index: number;
  device_id: string;
  device_name: string;
  asset_id: string | null;
  asset_name: string | null;
  asset_kind: string | null;
  site_id: string;
  site_name: string;
  mount_height_m: number | null;
  face_offset_m: number;
  calibration_offset_m: number;
  calibration_scale: number;
}

const CHANNEL_COLUMNS = `c.id, c.index, c.device_id, d.name AS device_name, c.asset_id, a.name AS asset_name, a.kind AS asset_kind,
  d.site_id, s.name AS site_name, a.mount_height_m, c.face_offset_m, c.calibration_offset_m, c.calibration_scale`;
const CHANNEL_FROM = `channels c JOIN devices d ON d.id = c.device_id JOIN sites s ON s.id = d.site_id LEFT JOIN assets a ON a.id = c.asset_id`;

function serialiseChannel(c: ChannelRow) {
  return {
    id: c.id,
    index: c.index,
    device_id: c.device_id,
    device_name: c.device_name,
    asset_id: c.asset_id,
    asset_name: c.asset_name,
    site_id: c.site_id,
    site_name: c.site_name,
    mount_height_m: c.mount_height_m,
    face_offset_m: c.face_offset_m,
    calibration_offset_m: c.calibration_offset_m,
    calibration_scale: c.calibration_scale,
  };
}
export type CalibrationChannelJson = ReturnType<typeof serialiseChannel>;

/** A channel of the organisation; another organisation's, or one that does not exist, is 404. */
export async function findCalibrationChannel(scope: Scope, channelId: string, transaction?: Transaction, lock = false): Promise<ChannelRow> {
  const [row] = await sqlRows<ChannelRow>(
    `SELECT ${CHANNEL_COLUMNS} FROM ${CHANNEL_FROM} WHERE c.id = $1 AND d.organisation_id = $2 AND ${siteScope(scope, "d.site_id")}${lock ? " FOR UPDATE OF c" : ""}`,
    [channelId, scope.organisationId],
    { transaction },
  );
  if (!row) throw notFound("That channel");
  return row;
}

/** A channel that can be calibrated from dips: it measures a tank whose sensor mounting height is known. */
function assertCalibratable(c: ChannelRow): asserts c is ChannelRow & { asset_id: string; mount_height_m: number } {
  if (!c.asset_id || c.asset_kind !== "tank") throw new AppError("invalid", "Only a channel that measures a tank is calibrated from dips.");
  if (c.mount_height_m === null) throw new AppError("invalid", "The tank has no sensor mounting height; set it before calibrating.");
}

export interface PairedDip {
  dip: DipJson;
  point: CalibrationPoint;
}

/** The chosen dips paired with the channel's raw distance at their times; a dip without a sensor value is named. */
async function pairDips(c: ChannelRow & { asset_id: string; mount_height_m: number }, dipIds: readonly string[], transaction?: Transaction): Promise<PairedDip[]> {
  const dips = await dipsWithSensor(c.asset_id, c.id, dipIds, transaction);
  const found = new Set(dips.map((d) => d.id));
  const unknown = dipIds.filter((id) => !found.has(id));
  if (unknown.length) throw new AppError("invalid", `dip_ids: ${unknown.length} of the chosen dips do not belong to this tank.`, { fields: { dip_ids: "Choose dips of this tank." } });
  const voided = dips.filter((d) => d.void !== null);
  if (voided.length) {
    const which = voided.map((d) => `${new Date(d.at).toISOString().replace(".000Z", "Z")} (${d.void!.reason})`).join(", ");
    throw new AppError("invalid", `dip_ids: the dip${voided.length > 1 ? "s" : ""} at ${which} ${voided.length > 1 ? "are" : "is"} void; choose dips that count.`, { fields: { dip_ids: "A voided dip does not count for calibration." } });
  }
  const current: Calibration = { offsetM: c.calibration_offset_m, scale: c.calibration_scale };
  const unmatched = dips.filter((d) => d.sensor === null || (d.sensor.raw_distance_m === null && d.sensor.distance_m === null));
  if (unmatched.length) {
    const when = unmatched.map((d) => new Date(d.at).toISOString().replace(".000Z", "Z")).join(", ");
    throw new AppError("invalid", `No sensor reading within an hour of the dip${unmatched.length > 1 ? "s" : ""} at ${when}; choose dips the sensor saw.`, { fields: { dip_ids: "Each dip needs a sensor reading within an hour." } });
  }
  return dips.map((dip) => {
    const s = dip.sensor!;
    // The stored raw distance is free of any calibration; without it, the stored distance has the current one undone.
    const raw = s.raw_distance_m ?? undoCalibration(s.distance_m!, c.face_offset_m, current);
    return { dip, point: { rawDistanceM: raw, trueDistanceM: trueDistanceFromDip(dip.level_m, c.mount_height_m, c.face_offset_m) } };
  });
}

function fitOrRefuse(paired: PairedDip[], currentScale: number): CalibrationFit {
  const result = fitCalibration(paired.map((p) => p.point), currentScale);
  if (!result.ok) throw new AppError("invalid", result.reason, { fields: { dip_ids: result.reason } });
  return result.fit;
}

function residualTable(paired: PairedDip[], current: Calibration, fit: CalibrationFit) {
  const before = residualsUnder(paired.map((p) => p.point), current);
  return paired.map((p, i) => ({
    dip_id: p.dip.id,
    at: p.dip.at,
    dip_level_m: p.dip.level_m,
    raw_distance_m: p.point.rawDistanceM,
    residual_before_m: before[i],
    residual_after_m: fit.residualsM[i],
  }));
}

/** The channel (locked inside a transaction), its chosen dips paired with the sensor, and the fit they give. */
async function fitChannel(scope: Scope, channelId: string, dipIds: readonly string[], transaction?: Transaction) {
  const c = await findCalibrationChannel(scope, channelId, transaction, transaction !== undefined);
  assertCalibratable(c);
  const paired = await pairDips(c, dipIds, transaction);
  const current: Calibration = { offsetM: c.calibration_offset_m, scale: c.calibration_scale };
  const fit = fitOrRefuse(paired, current.scale);
  return { c, paired, current, fit, residuals: residualTable(paired, current, fit) };
}

const rms = (xs: number[]) => (xs.length ? Math.sqrt(xs.reduce((s, x) => s + x * x, 0) / xs.length) : 0);

interface SeriesRow {
  at: Date;
  raw_distance_m: number;
  level_m: number | null;
}

/** The channel's valid measurements around the dips, averaged into at most ~300 buckets. */
async function previewSeries(channelId: string, from: Date, to: Date): Promise<SeriesRow[]> {
  const bucketS = Math.max(60, Math.ceil((to.getTime() - from.getTime()) / 1000 / 300));
  return sqlRows<SeriesRow>(
    // Each bucket is placed at its measurements' mean time, where its mean value belongs.
    `SELECT to_timestamp(avg(extract(epoch FROM at))) AS at, avg(raw_distance_m) AS raw_distance_m, avg(level_m) AS level_m
       FROM measurements
      WHERE channel_id = $1 AND status = 'ok' AND raw_distance_m IS NOT NULL AND at >= $2 AND at < $3
      GROUP BY date_bin(make_interval(secs => $4), at, $2::timestamptz) ORDER BY 1`,
    [channelId, from, to, bucketS],
  );
}

const DAY_MS = 86_400_000;
const PREVIEW_MAX_DAYS = 30;

/** The fit from the chosen dips, its residuals before and after, and the trend as it is and would be. */
export async function previewCalibration(scope: Scope, channelId: string, request: CalibrationRequest) {
  const { c, paired, current, fit, residuals } = await fitChannel(scope, channelId, request.dip_ids);
  const times = paired.map((p) => new Date(p.dip.at).getTime());
  const to = new Date(Math.min(Date.now(), Math.max(...times)) + DAY_MS / 2);
  const from = new Date(Math.max(Math.min(...times) - DAY_MS / 2, to.getTime() - PREVIEW_MAX_DAYS * DAY_MS));
  const series = await previewSeries(c.id, from, to);
  const mount = c.mount_height_m;
  const face = c.face_offset_m;
  return {
    channel: serialiseChannel(c),
    current: { offset_m: current.offsetM, scale: current.scale },
    proposed: { offset_m: fit.offsetM, scale: fit.scale, mode: fit.mode, note: fit.note },
    n: fit.n,
    spread: { dips_m: fit.dipSpreadM, sensor_m: fit.sensorSpreadM, sentence: spreadSentence(fit.dipSpreadM, fit.sensorSpreadM) },
    rms_before_m: rms(residuals.map((r) => r.residual_before_m)),
    rms_after_m: fit.rmsM,
    residuals,
    series: series.map((s) => ({
      at: s.at,
      level_now_m: levelFromRaw(s.raw_distance_m, mount, face, current),
      level_after_m: levelFromRaw(s.raw_distance_m, mount, face, fit),
    })),
    dips: paired.map((p) => ({ id: p.dip.id, at: p.dip.at, level_m: p.dip.level_m })),
  };
}
export type CalibrationPreviewJson = Awaited<ReturnType<typeof previewCalibration>>;

interface ChangeRow {
  id: string;
  by_name?: string | null;
  channel_id: string;
  at: Date;
  by_label: string;
  before_offset_m: number;
  before_scale: number;
  after_offset_m: number;
  after_scale: number;
  fit_mode: string;
  dip_ids: string[];
  residuals: ReturnType<typeof residualTable>;
  rms_before_m: number;
  rms_after_m: number;
  note: string | null;
}

function serialiseChange(r: ChangeRow) {
  return {
    id: r.id,
    channel_id: r.channel_id,
    at: r.at,
    by: r.by_label,
    before: { offset_m: r.before_offset_m, scale: r.before_scale },
    after: { offset_m: r.after_offset_m, scale: r.after_scale },
    mode: r.fit_mode,
    dip_ids: r.dip_ids,
    residuals: r.residuals,
    rms_before_m: r.rms_before_m,
    rms_after_m: r.rms_after_m,
    note: r.note,
  };
}
export type CalibrationChangeJson = ReturnType<typeof serialiseChange>;

const CHANGE_COLUMNS = "id, channel_id, at, by_label, before_offset_m, before_scale, after_offset_m, after_scale, fit_mode, dip_ids, residuals, rms_before_m, rms_after_m, note";

/** The channel with its calibration history, newest first. */
export async function channelCalibration(scope: Scope, channelId: string) {
  const c = await findCalibrationChannel(scope, channelId);
  const history = await sqlRows<ChangeRow>(
    `SELECT ${CHANGE_COLUMNS}, (SELECT u.name FROM users u WHERE u.id = cc.by_user_id) AS by_name
       FROM calibration_changes cc WHERE cc.channel_id = $1 ORDER BY cc.at DESC LIMIT 100`,
    [channelId],
  );
  return { channel: serialiseChannel(c), history: history.map((r) => serialiseChange({ ...r, by_label: personLabel(scope, r.by_label, r.by_name) ?? "" })) };
}

/** Fits again from the dips (never trusting a client's numbers), writes the calibration and its history, files the recompute. */
export async function applyCalibration(actor: Actor, channelId: string, request: CalibrationRequest) {
  return getSequelize().transaction(async (transaction) => {
    const { c, paired, current, fit, residuals } = await fitChannel(wholeOrganisation(actor.organisationId), channelId, request.dip_ids, transaction);
    await sqlRun(`UPDATE channels SET calibration_offset_m = $2, calibration_scale = $3, updated_at = now() WHERE id = $1`, [c.id, fit.offsetM, fit.scale], { transaction });
    const [change] = await sqlRows<ChangeRow>(
      `INSERT INTO calibration_changes (organisation_id, channel_id, asset_id, by_user_id, by_label, before_offset_m, before_scale, after_offset_m, after_scale,
                                        fit_mode, dip_ids, residuals, rms_before_m, rms_after_m, note)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11::uuid[], $12::jsonb, $13, $14, $15)
       RETURNING ${CHANGE_COLUMNS}`,
      [
        actor.organisationId,
        c.id,
        c.asset_id,
        actor.userId,
        actor.label,
        current.offsetM,
        current.scale,
        fit.offsetM,
        fit.scale,
        fit.mode,
        paired.map((p) => p.dip.id),
        JSON.stringify(residuals),
        rms(residuals.map((r) => r.residual_before_m)),
        fit.rmsM,
        request.note || null,
      ],
      { transaction },
    );
    const recompute = await requestRecompute({ channelId: c.id, reason: "calibration" }, transaction);
    await writeAudit(
      actor,
      "channel.calibrate",
      { type: "channel", id: c.id },
      {
        asset_id: c.asset_id,
        calibration_change_id: change.id,
        before: { offset_m: current.offsetM, scale: current.scale },
        after: { offset_m: fit.offsetM, scale: fit.scale },
        mode: fit.mode,
        dips: paired.length,
        rms_after_m: fit.rmsM,
        recompute_request_id: recompute.id,
      },
      transaction,
    );
    return { change: serialiseChange(change), recompute_request_id: recompute.id };
  });
}
