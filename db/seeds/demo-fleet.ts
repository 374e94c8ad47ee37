import { Op } from "sequelize";
import type { Actor } from "../../lib/services/audit";
import { Channel, Device, DeviceKey, Organisation, Site } from "../../lib/db/models";
import { createAsset } from "../../lib/services/assets";
import { createDevice, rotateDeviceKey } from "../../lib/services/devices";
import { createSite, updateSite } from "../../lib/services/sites";
import { deviceKeyMatches, prefixOfDeviceKey } from "../../lib/auth/device-keys";
import { createAssetSchema } from "../../lib/validations/asset";
import { createDeviceSchema } from "../../lib/validations/device";
import { createSiteSchema } from "../../lib/validations/site";
import { env } from "../../lib/env";
import { demoKeysFilePath } from "../../workers/simulation/keys-file";
import type { SimDevice } from "../../workers/simulation/keys-file";
import { DEMO_ORGANISATION } from "./demo-accounts";
import { readDemoKeysFile, simDeviceFromPlan, writeDemoKeysFile } from "./demo-keys";
import { DEMO_ASSETS, DEMO_DEVICES, DEMO_EXPECTED_INTERVAL_S, DEMO_SITES, type DemoAsset, type DemoSiteKey } from "./demo-plan";

const log = (line: string) => process.stdout.write(`[halftrip] ${line}\n`);
const keysFile = () => demoKeysFilePath(env.dataFiles, process.cwd());

function assetInput(asset: DemoAsset, siteId: string) {
  if (asset.kind === "tank") {
    return { site_id: siteId, kind: "tank", name: asset.name, purpose: asset.purpose, geometry: asset.geometry, mount_height_m: asset.mount_height_m, safe_fill_pct: asset.safe_fill_pct, reorder_pct: asset.reorder_pct };
  }
  return {
    site_id: siteId, kind: "bay", name: asset.name, floor_distance_m: asset.floor_distance_m, occupied_below_m: asset.occupied_below_m,
    bay_row: asset.row, bay_col: asset.col, bay_level: asset.level,
  };
}

/** Creates the demo sites, assets and devices through the product's own queries (validation and audit rows apply). */
async function createDemoFleet(actor: Actor): Promise<SimDevice[]> {
  const siteIds = {} as Record<DemoSiteKey, string>;
  for (const s of DEMO_SITES) {
    const site = await createSite(actor, createSiteSchema.parse({ name: s.name, time_zone: s.time_zone, air_temp_c: s.air_temp_c, humidity_pct: s.humidity_pct }));
    siteIds[s.key] = site.id;
  }
  const assetIds: Record<string, string> = {};
  for (const a of DEMO_ASSETS) {
    const asset = await createAsset(actor, createAssetSchema.parse(assetInput(a, siteIds[a.site])));
    assetIds[a.key] = asset.id;
  }
  const devices: SimDevice[] = [];
  for (const d of DEMO_DEVICES) {
    const input = createDeviceSchema.parse({
      site_id: siteIds[d.site], serial: d.serial, name: d.name, profile: d.profile, firmware: d.firmware,
      clock_hz: d.clock_hz ?? null, prescaler: d.prescaler ?? null, timer_bits: d.timer_bits ?? null,
      us_per_mm: d.us_per_mm ?? null, zero_m: d.zero_m ?? null, span_m: d.span_m ?? null,
      expected_interval_s: DEMO_EXPECTED_INTERVAL_S,
      channels: d.channels.map((c) => ({ index: c.index, asset_id: assetIds[c.asset], min_range_m: c.min_range_m, max_range_m: c.max_range_m, face_offset_m: 0 })),
    });
    const { device, api_key } = await createDevice(actor, input);
    const source = d.channels.find((c) => c.temperature_source);
    const sourceChannel = source && device.channels.find((c) => c.index === source.index);
    if (sourceChannel) await updateSite(actor, siteIds[d.site], { temperature_channel_id: sourceChannel.id });
    devices.push(simDeviceFromPlan(d, { deviceId: device.id, apiKey: api_key, siteId: siteIds[d.site], assetIds }));
  }
  return devices;
}

async function keyStillWorks(deviceId: string, apiKey: string | undefined): Promise<boolean> {
  const prefix = apiKey ? prefixOfDeviceKey(apiKey) : null;
  if (!apiKey || !prefix) return false;
  const key = await DeviceKey.findOne({ where: { device_id: deviceId, prefix, revoked_at: null } });
  return !!key && deviceKeyMatches(apiKey, key.key_hash);
}

/**
 * For a database that already has the demo fleet: keeps the keys file when every demo device's key in it
 * still works, otherwise rotates the keys that do not and rewrites the file.
 */
async function refreshDemoKeys(actor: Actor): Promise<void> {
  const devices = await Device.findAll({ where: { organisation_id: actor.organisationId, serial: { [Op.in]: DEMO_DEVICES.map((d) => d.serial) } } });
  if (!devices.length) return;
  const file = keysFile();
  const saved = new Map((readDemoKeysFile(file)?.devices ?? []).map((d) => [d.id, d]));
  const entries: SimDevice[] = [];
  let changed = devices.length !== saved.size;
  for (const row of devices) {
    const plan = DEMO_DEVICES.find((d) => d.serial === row.serial);
    if (!plan) continue;
    let apiKey = saved.get(row.id)?.api_key;
    if (!(await keyStillWorks(row.id, apiKey))) {
      apiKey = (await rotateDeviceKey(actor, row.id)).api_key;
      changed = true;
    }
    const channels = await Channel.findAll({ where: { device_id: row.id } });
    const assetIds: Record<string, string> = {};
    for (const c of plan.channels) {
      const assetId = channels.find((ch) => ch.index === c.index)?.asset_id;
      if (assetId) assetIds[c.asset] = assetId;
    }
    entries.push(simDeviceFromPlan(plan, { deviceId: row.id, apiKey: apiKey as string, siteId: row.site_id, assetIds }));
  }
  if (!changed) return;
  writeDemoKeysFile(file, entries);
  log(`demo device keys rotated and written to ${file}`);
}

/**
 * The demo fleet of the demo organisation: on a fresh database (or one seeded before the fleet existed)
 * creates it and writes the devices' keys to the keys file; with onlyKeys, makes sure the file's keys work.
 */
export async function seedDemoFleet({ organisationId, onlyKeys = false }: { organisationId?: string; onlyKeys?: boolean }): Promise<void> {
  const orgId = organisationId ?? (await Organisation.findOne({ where: { name: DEMO_ORGANISATION } }))?.id;
  if (!orgId) return;
  const actor: Actor = { organisationId: orgId, userId: null, label: "seed" };
  const hasFleet = (await Site.count({ where: { organisation_id: orgId } })) > 0 || (await Device.count({ where: { organisation_id: orgId } })) > 0;
  if (onlyKeys && hasFleet) {
    await refreshDemoKeys(actor);
    return;
  }
  if (hasFleet) return;
  const devices = await createDemoFleet(actor);
  const file = keysFile();
  writeDemoKeysFile(file, devices);
  log(`demo fleet seeded: ${DEMO_SITES.length} sites, ${DEMO_ASSETS.length} assets, ${devices.length} devices; keys in ${file}`);
}
