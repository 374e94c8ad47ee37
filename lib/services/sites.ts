import { siteScopeWhere, wholeOrganisation, type Scope } from "../db/site-scope";
import { writeAudit, type Actor } from "./audit";
import { Site } from "../db/models";
import { getSequelize } from "../db/sequelize";
import { sqlRows } from "../db/sql";
import { AppError, notFound } from "../errors";
import type { SiteInput } from "../validations/site";
import { requestSiteRecompute } from "./recompute-requests";

export function serialiseSite(s: Site) {
  return {
    id: s.id,
    name: s.name,
    time_zone: s.time_zone,
    latitude: s.latitude ?? null,
    longitude: s.longitude ?? null,
    air_temp_c: s.air_temp_c ?? null,
    humidity_pct: s.humidity_pct ?? null,
    temperature_channel_id: s.temperature_channel_id ?? null,
    escalation_delay_min: s.escalation_delay_min,
    created_at: s.created_at,
    updated_at: s.updated_at,
  };
}
export type SiteJson = ReturnType<typeof serialiseSite>;

export async function listSites(scope: Scope) {
  const sites = await Site.findAll({ where: siteScopeWhere(scope, "id"), order: [["name", "ASC"]] });
  return sites.map(serialiseSite);
}

export async function findSite(scope: Scope, id: string): Promise<Site> {
  const site = await Site.findOne({ where: { id, ...siteScopeWhere(scope, "id") } });
  if (!site) throw notFound("That site");
  return site;
}

async function assertTemperatureChannel(organisationId: string, channelId: string | null | undefined) {
  if (!channelId) return;
  const rows = await sqlRows(
    `SELECT 1 FROM channels c JOIN devices d ON d.id = c.device_id WHERE c.id = :channelId AND d.organisation_id = :organisationId`,
    { channelId, organisationId },
  );
  if (!rows.length) throw new AppError("invalid", "temperature_channel_id: no such channel in your organisation.", { fields: { temperature_channel_id: "No such channel in your organisation." } });
}

export async function createSite(actor: Actor, input: SiteInput) {
  await assertTemperatureChannel(actor.organisationId, input.temperature_channel_id);
  return getSequelize().transaction(async (transaction) => {
    const site = await Site.create({ ...input, organisation_id: actor.organisationId }, { transaction });
    await writeAudit(actor, "site.create", { type: "site", id: site.id }, { ...input }, transaction);
    return serialiseSite(site);
  });
}

// The fields the worker's air temperature (and so every distance measured at the site) depends on.
const TEMPERATURE_FIELDS = ["air_temp_c", "humidity_pct", "temperature_channel_id"] as const;

export async function updateSite(actor: Actor, id: string, patch: Partial<SiteInput>) {
  const site = await findSite(wholeOrganisation(actor.organisationId), id);
  await assertTemperatureChannel(actor.organisationId, patch.temperature_channel_id);
  const before = Object.fromEntries(TEMPERATURE_FIELDS.map((f) => [f, site[f] ?? null]));
  return getSequelize().transaction(async (transaction) => {
    await site.update(patch, { transaction });
    const changed = TEMPERATURE_FIELDS.filter((f) => f in patch && (site[f] ?? null) !== before[f]);
    const recompute = changed.length
      ? await requestSiteRecompute(id, { reason: `site ${changed.join(", ")} changed`, temperatureChannelId: changed.includes("temperature_channel_id") ? (site.temperature_channel_id ?? null) : null }, transaction)
      : [];
    await writeAudit(actor, "site.update", { type: "site", id }, { ...patch, ...(recompute.length ? { recompute_request_ids: recompute } : {}) }, transaction);
    return serialiseSite(site);
  });
}
