import { siteScopeWhere, wholeOrganisation, type Scope } from "../db/site-scope";
import { writeAudit, type Actor } from "./audit";
import { Asset, Site } from "../db/models";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import { tankPurposeOf } from "../forecast/purpose";
import { tankHeight } from "../geometry/tank-volume";
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

export async function createAsset(actor: Actor, input: AssetInput) {
  const site = await Site.findOne({ where: { id: input.site_id, organisation_id: actor.organisationId } });
  if (!site) throw new AppError("invalid", "site_id: no such site in your organisation.", { fields: { site_id: "No such site in your organisation." } });
  return getSequelize().transaction(async (transaction) => {
    const asset = await Asset.create({ ...input, organisation_id: actor.organisationId, capacity_l: capacityToStore(input), purpose: tankPurposeOf(input.kind, input.purpose) }, { transaction });
    await writeAudit(actor, "asset.create", { type: "asset", id: asset.id }, { name: input.name, kind: input.kind }, transaction);
    return serialiseAsset(asset);
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
  return getSequelize().transaction(async (transaction) => {
    await asset.update({ ...patch, capacity_l: capacityToStore(merged) }, { transaction });
    await writeAudit(actor, "asset.update", { type: "asset", id }, { ...patch }, transaction);
    return { asset: serialiseAsset(asset), shapeChanged };
  });
}
