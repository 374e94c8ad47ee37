import { siteScopeWhere, wholeOrganisation, type Scope } from "../db/site-scope";
import { writeAudit, type Actor } from "./audit";
import { Asset, Site } from "../db/models";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import { tankPurposeOf } from "../forecast/purpose";
import { tankHeight, type TankGeometry } from "../geometry/tank-volume";
import { mountingQuestions, type Question } from "../input-checks/questions";
import { sqlRows } from "../db/sql";
import { assetConsistencyIssues, capacityToStore, type AssetInput, type AssetPatch } from "../validations/asset";

export function serialiseAsset(a: Asset) {
  return {
    id: a.id,
    site_id: a.site_id,
    kind: a.kind,
    name: a.name,
    mount_height_m: a.mount_height_m ?? null,
    purpose: a.purpose ?? null,
    capacity_l: a.capacity_l ?? null,
    safe_fill_pct: a.safe_fill_pct ?? null,
    reorder_pct: a.reorder_pct ?? null,
    floor_distance_m: a.floor_distance_m ?? null,
    occupied_below_m: a.occupied_below_m ?? null,
    geometry: a.geometry ?? null,
    tank_height_m: a.geometry ? tankHeight(a.geometry) : null,
    bay_row: a.bay_row ?? null,
    bay_col: a.bay_col ?? null,
    bay_level: a.bay_level ?? null,
    created_at: a.created_at,
    updated_at: a.updated_at,
  };
}
export type AssetJson = ReturnType<typeof serialiseAsset>;

export async function listAssets(scope: Scope, filter: { site_id?: string; kind?: string } = {}) {
  const where: Record<string | symbol, unknown> = { ...siteScopeWhere(scope) };
  if (filter.site_id) where.site_id = filter.site_id;
  if (filter.kind) where.kind = filter.kind;
  const assets = await Asset.findAll({ where, order: [["name", "ASC"]] });
  return assets.map(serialiseAsset);
}

export async function findAsset(scope: Scope, id: string): Promise<Asset> {
  const asset = await Asset.findOne({ where: { id, ...siteScopeWhere(scope) } });
  if (!asset) throw notFound("That asset");
  return asset;
}

/** A warning the save went through with: said to the person, not refused. */
export type AssetWarning = Pick<Question, "field" | "message">;

/**
 * Questions about where a tank's sensor sits: inside the tank (below its top) is refused, since levels
 * above the face could never be measured; a full tank inside a channel's blanking distance or a bottom
 * beyond its range is saved with a warning saying which levels will not read.
 */
async function mountingWarnings(a: { kind: string; mount_height_m?: number | null; geometry?: TankGeometry | null }, assetId: string | null): Promise<AssetWarning[]> {
  if (a.kind !== "tank" || a.mount_height_m == null || a.geometry == null) return [];
  const tankHeightM = tankHeight(a.geometry);
  const channels = assetId
    ? await sqlRows<{ min_range_m: number; max_range_m: number }>(`SELECT min_range_m, max_range_m FROM channels WHERE asset_id = $1`, [assetId])
    : [];
  const questions = (channels.length ? channels : [{ min_range_m: null, max_range_m: null }]).flatMap((c) =>
    mountingQuestions({ mountHeightM: a.mount_height_m!, tankHeightM, minRangeM: c.min_range_m, maxRangeM: c.max_range_m }),
  );
  const refused = questions.find((q) => q.severity === "refuse");
  if (refused) throw new AppError("invalid", `${refused.field}: ${refused.message}`, { fields: { [refused.field]: refused.message } });
  return [...new Map(questions.map((q) => [q.message, { field: q.field, message: q.message }])).values()];
}

export async function createAsset(actor: Actor, input: AssetInput) {
  const site = await Site.findOne({ where: { id: input.site_id, organisation_id: actor.organisationId } });
  if (!site) throw new AppError("invalid", "site_id: no such site in your organisation.", { fields: { site_id: "No such site in your organisation." } });
  const warnings = await mountingWarnings(input, null);
  return getSequelize().transaction(async (transaction) => {
    const asset = await Asset.create({ ...input, organisation_id: actor.organisationId, capacity_l: capacityToStore(input), purpose: tankPurposeOf(input.kind, input.purpose) }, { transaction });
    await writeAudit(actor, "asset.create", { type: "asset", id: asset.id }, { name: input.name, kind: input.kind, ...(warnings.length ? { warnings: warnings.map((w) => w.message) } : {}) }, transaction);
    return { ...serialiseAsset(asset), warnings };
  });
}

/** Returns the updated asset and whether its geometry or mounting changed (its measurements must be recomputed). */
export async function updateAsset(actor: Actor, id: string, patch: AssetPatch) {
  const asset = await findAsset(wholeOrganisation(actor.organisationId), id);
  const merged = { ...serialiseAsset(asset), ...patch };
  // A stored capacity carries over only while the strapping table it was given with stays.
  if (!("capacity_l" in patch) && ("geometry" in patch || merged.geometry?.shape !== "strapping")) merged.capacity_l = null;
  const issues = assetConsistencyIssues(merged);
  if (issues.length) {
    throw new AppError("invalid", issues.map((i) => `${i.path}: ${i.message}`).join("; "), { fields: Object.fromEntries(issues.map((i) => [i.path, i.message])) });
  }
  const shapeChanged = "geometry" in patch || "capacity_l" in patch || "mount_height_m" in patch || "floor_distance_m" in patch || "occupied_below_m" in patch;
  // Asked only when the mounting or the shape changes, so renaming an older tank is never refused.
  const warnings = "mount_height_m" in patch || "geometry" in patch ? await mountingWarnings(merged, id) : [];
  return getSequelize().transaction(async (transaction) => {
    await asset.update({ ...patch, capacity_l: capacityToStore(merged) }, { transaction });
    await writeAudit(actor, "asset.update", { type: "asset", id }, { ...patch, ...(warnings.length ? { warnings: warnings.map((w) => w.message) } : {}) }, transaction);
    return { asset: { ...serialiseAsset(asset), warnings }, shapeChanged };
  });
}
