// Manual dips of a tank: recorded by a technician (or imported), listed beside the sensor's level at
// the dip's time, so a drift or a wrong calibration shows as the difference between the two.

import { personLabel, wholeOrganisation, type Scope } from "../db/site-scope";
import type { Transaction } from "sequelize";
import { writeAudit, type Actor } from "./audit";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import { tankHeight } from "../geometry/tank-volume";
import { dipDateQuestion, dipLevelQuestion, type DipDateFacts, type Question } from "../input-checks/questions";
import { findAsset } from "./assets";
import type { RecordDipInput, VoidDipInput } from "../validations/dip";
import type { Asset } from "../db/models";
import { sqlRows, sqlRun } from "../db/sql";

/** How far from a dip's time a measurement may lie and still stand for the sensor at that time. */
export const SENSOR_MATCH_WINDOW_S = 3600;

export interface AssetChannel {
  id: string;
  index: number;
  device_id: string;
  device_name: string;
  face_offset_m: number;
  calibration_offset_m: number;
  calibration_scale: number;
}

/** The channels that measure an asset, first by device name then index (the first is the asset's default). */
export async function channelsOfAsset(assetId: string, transaction?: Transaction): Promise<AssetChannel[]> {
  return sqlRows<AssetChannel>(
    `SELECT c.id, c.index, c.device_id, d.name AS device_name, c.face_offset_m, c.calibration_offset_m, c.calibration_scale
       FROM channels c JOIN devices d ON d.id = c.device_id
      WHERE c.asset_id = $1 ORDER BY d.name, c.index`,
    [assetId],
    { transaction },
  );
}

interface DipRow {
  id: string;
  at: Date;
  level_m: number;
  note: string | null;
  by_label: string | null;
  by_name?: string | null;
  created_at: Date;
  sensor_at: Date | null;
  sensor_level_m: number | null;
  sensor_raw_distance_m: number | null;
  sensor_distance_m: number | null;
  voided_at: Date | null;
  void_reason: string | null;
  voided_by_label: string | null;
  voided_by_name?: string | null;
}

export function serialiseDip(d: DipRow) {
  return {
    id: d.id,
    at: d.at,
    level_m: d.level_m,
    note: d.note,
    by: d.by_label,
    created_at: d.created_at,
    sensor:
      d.sensor_at === null
        ? null
        : { at: d.sensor_at, level_m: d.sensor_level_m, raw_distance_m: d.sensor_raw_distance_m, distance_m: d.sensor_distance_m },
    /** Sensor level − dipped level; positive when the sensor reads high. */
    difference_m: d.sensor_level_m === null ? null : d.sensor_level_m - d.level_m,
    /** A voided dip stays listed with who voided it and why, and counts nowhere. */
    void: d.voided_at === null ? null : { at: d.voided_at, by: d.voided_by_label, reason: d.void_reason ?? "" },
  };
}
export type DipJson = ReturnType<typeof serialiseDip>;

// The nearest valid measurement of the channel within the window: one index probe each side of the dip.
const SENSOR_AT_DIP = `
  LEFT JOIN LATERAL (
    SELECT * FROM (
      (SELECT m.at, m.level_m, m.raw_distance_m, m.distance_m FROM measurements m
        WHERE m.channel_id = $2 AND m.status = 'ok' AND m.at <= d.at AND m.at >= d.at - make_interval(secs => $3)
        ORDER BY m.at DESC LIMIT 1)
      UNION ALL
      (SELECT m.at, m.level_m, m.raw_distance_m, m.distance_m FROM measurements m
        WHERE m.channel_id = $2 AND m.status = 'ok' AND m.at > d.at AND m.at <= d.at + make_interval(secs => $3)
        ORDER BY m.at ASC LIMIT 1)
    ) near ORDER BY abs(extract(epoch FROM near.at - d.at)) LIMIT 1
  ) s ON true`;

const DIP_COLUMNS = `d.id, d.at, d.level_m, d.note, d.created_at, coalesce(u.name, u.email) AS by_label, u.name AS by_name,
  s.at AS sensor_at, s.level_m AS sensor_level_m, s.raw_distance_m AS sensor_raw_distance_m, s.distance_m AS sensor_distance_m,
  d.voided_at, d.void_reason, coalesce(vu.name, vu.email) AS voided_by_label, vu.name AS voided_by_name`;
const DIP_FROM = `manual_dips d LEFT JOIN users u ON u.id = d.by_user_id LEFT JOIN users vu ON vu.id = d.voided_by`;

/** The asset's dips, newest first, each with the channel's level nearest its time. */
export async function listDips(scope: Scope, assetId: string, channelId: string | null, limit = 200) {
  await findAsset(scope, assetId);
  const rows = await sqlRows<DipRow>(
    `SELECT ${DIP_COLUMNS}
       FROM ${DIP_FROM}
       ${SENSOR_AT_DIP}
      WHERE d.asset_id = $1
      ORDER BY d.at DESC LIMIT $4`,
    [assetId, channelId, SENSOR_MATCH_WINDOW_S, limit],
  );
  return rows.map((r) =>
    serialiseDip({ ...r, by_label: personLabel(scope, r.by_label, r.by_name), voided_by_label: personLabel(scope, r.voided_by_label, r.voided_by_name) }),
  );
}

/** The chosen dips of an asset with the channel's measurement at each; unknown ids are left out, voided ones included (the caller says why they do not count). */
export async function dipsWithSensor(assetId: string, channelId: string, dipIds: readonly string[], transaction?: Transaction) {
  const rows = await sqlRows<DipRow>(
    `SELECT ${DIP_COLUMNS}
       FROM ${DIP_FROM}
       ${SENSOR_AT_DIP}
      WHERE d.asset_id = $1 AND d.id = ANY($4::uuid[])
      ORDER BY d.at`,
    [assetId, channelId, SENSOR_MATCH_WINDOW_S, dipIds],
    { transaction },
  );
  return rows.map(serialiseDip);
}

/** The highest level a dip can have: the tank's height, or the sensor's mounting height when the shape is unknown. */
export function maxDipLevel(asset: Pick<Asset, "geometry" | "mount_height_m">): number | null {
  return asset.geometry ? tankHeight(asset.geometry) : (asset.mount_height_m ?? null);
}

export function assertDippable(asset: Pick<Asset, "kind" | "geometry" | "mount_height_m">) {
  if (asset.kind !== "tank") throw new AppError("invalid", "Manual dips are taken on tanks; this asset is not a tank.");
}

export interface NewDip {
  at: Date;
  level_m: number;
  note: string | null;
}

/** Inserts dips in one statement; returns the ids in input order. Used by the form and by imports. */
export async function insertDips(assetId: string, userId: string | null, dips: readonly NewDip[], transaction: Transaction): Promise<string[]> {
  if (dips.length === 0) return [];
  const rows = await sqlRows<{ id: string }>(
    `INSERT INTO manual_dips (asset_id, at, level_m, note, by_user_id)
     SELECT $1, v.at, v.level_m, v.note, $2 FROM unnest($3::timestamptz[], $4::float8[], $5::text[]) WITH ORDINALITY AS v(at, level_m, note, n)
     ORDER BY v.n
     RETURNING id`,
    [assetId, userId, dips.map((d) => d.at), dips.map((d) => d.level_m), dips.map((d) => d.note)],
    { transaction },
  );
  return rows.map((r) => r.id);
}

/** Dip times of the asset that are already recorded, among those given (a dip is once per time; a voided one leaves its time free for the corrected dip). */
export async function existingDipTimes(assetId: string, times: readonly Date[], transaction?: Transaction): Promise<Set<number>> {
  if (times.length === 0) return new Set();
  const rows = await sqlRows<{ at: Date }>(
    `SELECT at FROM manual_dips WHERE asset_id = $1 AND at = ANY($2::timestamptz[]) AND voided_at IS NULL`,
    [assetId, times],
    { transaction },
  );
  return new Set(rows.map((r) => new Date(r.at).getTime()));
}

/** What bounds a dip's time: now, the asset's creation and its earliest measurement (a backfill may reach further back). */
export async function dipDateFacts(asset: Pick<Asset, "id" | "created_at">, now = new Date()): Promise<DipDateFacts> {
  const [row] = await sqlRows<{ earliest: Date | null }>(
    `SELECT min(first.at) AS earliest FROM channels c
       CROSS JOIN LATERAL (SELECT m.at FROM measurements m WHERE m.channel_id = c.id ORDER BY m.at LIMIT 1) first
      WHERE c.asset_id = $1`,
    [asset.id],
  );
  return { now, assetCreatedAt: asset.created_at, earliestDataAt: row?.earliest ?? null };
}

function refuse(question: Question): never {
  throw new AppError("invalid", `${question.field}: ${question.message}`, { fields: { [question.field]: question.message } });
}

export async function recordDip(actor: Actor, assetId: string, input: RecordDipInput) {
  const asset = await findAsset(wholeOrganisation(actor.organisationId), assetId);
  assertDippable(asset);
  const levelQuestion = dipLevelQuestion(input.level_m, maxDipLevel(asset));
  if (levelQuestion) refuse(levelQuestion);
  const at = input.at ? new Date(input.at) : new Date();
  const dateQuestion = dipDateQuestion(at, await dipDateFacts(asset));
  if (dateQuestion) refuse(dateQuestion);
  return getSequelize().transaction(async (transaction) => {
    if ((await existingDipTimes(assetId, [at], transaction)).size) {
      throw new AppError("conflict", "A dip at this exact time is already recorded for this tank.");
    }
    const [id] = await insertDips(assetId, actor.userId, [{ at, level_m: input.level_m, note: input.note || null }], transaction);
    await writeAudit(actor, "dip.record", { type: "asset", id: assetId }, { dip_id: id, at: at.toISOString(), level_m: input.level_m }, transaction);
    return id;
  });
}

/** Voids a dip with a reason: kept and listed, but left out of calibration, drift detection and charts. */
export async function voidDip(actor: Actor, dipId: string, input: VoidDipInput) {
  return getSequelize().transaction(async (transaction) => {
    const [dip] = await sqlRows<{ asset_id: string; at: Date; level_m: number; voided_at: Date | null }>(
      `SELECT d.asset_id, d.at, d.level_m, d.voided_at FROM manual_dips d JOIN assets a ON a.id = d.asset_id
        WHERE d.id = $1 AND a.organisation_id = $2 FOR UPDATE OF d`,
      [dipId, actor.organisationId],
      { transaction },
    );
    if (!dip) throw notFound("That dip");
    if (dip.voided_at !== null) throw new AppError("conflict", "This dip is already void.");
    await sqlRun(
      `UPDATE manual_dips SET voided_at = now(), voided_by = $2, void_reason = $3 WHERE id = $1`,
      [dipId, actor.userId, input.reason],
      { transaction },
    );
    await writeAudit(actor, "dip.void", { type: "asset", id: dip.asset_id }, { dip_id: dipId, at: new Date(dip.at).toISOString(), level_m: dip.level_m, reason: input.reason }, transaction);
    return { id: dipId, asset_id: dip.asset_id };
  });
}
