import { siteScopeWhere, wholeOrganisation, type Scope } from "../db/site-scope";
import { Op, type Transaction } from "sequelize";
import { writeAudit, type Actor } from "./audit";
import { Asset, Channel, Device, DeviceKey, Site } from "../db/models";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import { generateDeviceKey } from "../auth/device-keys";
import { captureResolution } from "../physics/time-of-flight";
import { speedOfSoundDry } from "../physics/speed-of-sound";
import { tankHeight } from "../geometry/tank-volume";
import { profileIssues, type ChannelInput, type DeviceInput, type DevicePatch } from "../validations/device";

export function serialiseChannel(c: Channel) {
  return {
    id: c.id,
    index: c.index,
    asset_id: c.asset_id ?? null,
    min_range_m: c.min_range_m,
    max_range_m: c.max_range_m,
    face_offset_m: c.face_offset_m,
    calibration_offset_m: c.calibration_offset_m,
    calibration_scale: c.calibration_scale,
    stated_accuracy_m: c.stated_accuracy_m ?? null,
  };
}

export function serialiseDevice(d: Device, channels: Channel[]) {
  return {
    id: d.id,
    site_id: d.site_id,
    serial: d.serial,
    name: d.name,
    profile: d.profile,
    clock_hz: d.clock_hz ?? null,
    prescaler: d.prescaler ?? null,
    timer_bits: d.timer_bits ?? null,
    us_per_mm: d.us_per_mm ?? null,
    zero_m: d.zero_m ?? null,
    span_m: d.span_m ?? null,
    expected_interval_s: d.expected_interval_s,
    max_requests_per_min: d.max_requests_per_min,
    firmware: d.firmware ?? null,
    last_seen_at: d.last_seen_at ?? null,
    battery_v: d.battery_v ?? null,
    rssi_dbm: d.rssi_dbm ?? null,
    channels: [...channels].sort((a, b) => a.index - b.index).map(serialiseChannel),
    created_at: d.created_at,
    updated_at: d.updated_at,
  };
}
export type DeviceJson = ReturnType<typeof serialiseDevice>;

export async function listDevices(scope: Scope, filter: { site_id?: string } = {}) {
  const where: Record<string | symbol, unknown> = { ...siteScopeWhere(scope) };
  if (filter.site_id) where.site_id = filter.site_id;
  const devices = await Device.findAll({ where, order: [["name", "ASC"]], include: [{ model: Channel, as: "channels" }] });
  return devices.map((d) => serialiseDevice(d, (d as unknown as { channels: Channel[] }).channels));
}

export async function findDevice(scope: Scope, id: string): Promise<{ device: Device; channels: Channel[] }> {
  const device = await Device.findOne({ where: { id, ...siteScopeWhere(scope) } });
  if (!device) throw notFound("That device");
  const channels = await Channel.findAll({ where: { device_id: id }, order: [["index", "ASC"]] });
  return { device, channels };
}

/** Keys as the device page shows them: prefix and dates only, never the hash. */
export async function listDeviceKeys(deviceId: string) {
  const keys = await DeviceKey.findAll({ where: { device_id: deviceId }, order: [["created_at", "DESC"]] });
  return keys.map((k) => ({ id: k.id, prefix: k.prefix, created_at: k.created_at, revoked_at: k.revoked_at ?? null }));
}

/** Resolution and wrap range of a capture device, and the assigned tanks taller than that range. */
export async function describeDeviceTiming(d: DeviceJson) {
  if (d.profile !== "capture" || !d.clock_hz || !d.prescaler || !d.timer_bits) return null;
  const r = captureResolution({ clockHz: d.clock_hz, prescaler: d.prescaler, timerBits: d.timer_bits, speedMs: speedOfSoundDry(20) });
  if (!r.ok) return null;
  const assetIds = d.channels.map((c) => c.asset_id).filter((x): x is string => !!x);
  const assets = assetIds.length ? await Asset.findAll({ where: { id: { [Op.in]: assetIds } } }) : [];
  const tooTall = assets
    .filter((a) => a.kind === "tank" && a.geometry && Math.max(a.mount_height_m ?? 0, tankHeight(a.geometry)) > r.value.wrapRangeM)
    .map((a) => ({ asset_id: a.id, name: a.name, height_m: Math.max(a.mount_height_m ?? 0, a.geometry ? tankHeight(a.geometry) : 0) }));
  return { tick_us: r.value.tickUs, mm_per_tick: r.value.mmPerTick, wrap_us: r.value.wrapUs, wrap_range_m: r.value.wrapRangeM, at_temp_c: 20, tanks_beyond_wrap: tooTall };
}

async function assertChannelAssets(organisationId: string, siteId: string, channels: ChannelInput[], transaction: Transaction) {
  const ids = channels.map((c) => c.asset_id).filter((x): x is string => !!x);
  if (!ids.length) return;
  const found = await Asset.findAll({ where: { id: { [Op.in]: ids }, organisation_id: organisationId }, transaction });
  for (const c of channels) {
    if (!c.asset_id) continue;
    const asset = found.find((a) => a.id === c.asset_id);
    if (!asset) throw new AppError("invalid", `channels.${c.index}.asset_id: no such asset in your organisation.`, { fields: { [`channels.${c.index}.asset_id`]: "No such asset in your organisation." } });
    if (asset.site_id !== siteId) throw new AppError("invalid", `channels.${c.index}.asset_id: the asset is at another site than the device.`, { fields: { [`channels.${c.index}.asset_id`]: "The asset is at another site than the device." } });
  }
}

async function replaceChannels(deviceId: string, channels: ChannelInput[], transaction: Transaction) {
  const existing = await Channel.findAll({ where: { device_id: deviceId }, transaction });
  const keep = new Set(channels.map((c) => c.index));
  for (const old of existing) if (!keep.has(old.index)) await old.destroy({ transaction });
  for (const c of channels) {
    const current = existing.find((e) => e.index === c.index);
    const values = { asset_id: c.asset_id ?? null, min_range_m: c.min_range_m, max_range_m: c.max_range_m, face_offset_m: c.face_offset_m, stated_accuracy_m: c.stated_accuracy_m ?? null };
    if (current) await current.update(values, { transaction });
    else await Channel.create({ device_id: deviceId, index: c.index, ...values }, { transaction });
  }
}

function serialTaken(err: unknown): boolean {
  return (err as { name?: string })?.name === "SequelizeUniqueConstraintError";
}

export async function createDevice(actor: Actor, input: DeviceInput) {
  const site = await Site.findOne({ where: { id: input.site_id, organisation_id: actor.organisationId } });
  if (!site) throw new AppError("invalid", "site_id: no such site in your organisation.", { fields: { site_id: "No such site in your organisation." } });
  const key = generateDeviceKey();
  try {
    return await getSequelize().transaction(async (transaction) => {
      await assertChannelAssets(actor.organisationId, input.site_id, input.channels, transaction);
      const { channels, ...fields } = input;
      const device = await Device.create({ ...fields, organisation_id: actor.organisationId }, { transaction });
      await replaceChannels(device.id, channels, transaction);
      await DeviceKey.create({ device_id: device.id, prefix: key.prefix, key_hash: key.hash }, { transaction });
      await writeAudit(actor, "device.create", { type: "device", id: device.id }, { serial: input.serial, profile: input.profile, key_prefix: key.prefix }, transaction);
      const saved = await Channel.findAll({ where: { device_id: device.id }, transaction });
      return { device: serialiseDevice(device, saved), api_key: key.apiKey };
    });
  } catch (err) {
    if (serialTaken(err)) throw new AppError("conflict", "A device with this serial already exists in your organisation.");
    throw err;
  }
}

export async function updateDevice(actor: Actor, id: string, patch: DevicePatch) {
  const { device } = await findDevice(wholeOrganisation(actor.organisationId), id);
  const merged = { ...device.get(), ...patch };
  const issues = profileIssues(merged);
  if (issues.length) throw new AppError("invalid", issues.map((i) => `${i.path}: ${i.message}`).join("; "), { fields: Object.fromEntries(issues.map((i) => [i.path, i.message])) });
  try {
    return await getSequelize().transaction(async (transaction) => {
      const { channels, ...fields } = patch;
      if (channels) {
        await assertChannelAssets(actor.organisationId, device.site_id, channels, transaction);
        await replaceChannels(id, channels, transaction);
      }
      await device.update(fields, { transaction });
      await writeAudit(actor, "device.update", { type: "device", id }, { ...patch }, transaction);
      const saved = await Channel.findAll({ where: { device_id: id }, transaction });
      return serialiseDevice(device, saved);
    });
  } catch (err) {
    if (serialTaken(err)) throw new AppError("conflict", "A device with this serial already exists in your organisation.");
    throw err;
  }
}

/** Issues a new key and revokes every earlier one in the same transaction: the old key stops at once. */
export async function rotateDeviceKey(actor: Actor, id: string) {
  await findDevice(wholeOrganisation(actor.organisationId), id);
  const key = generateDeviceKey();
  await getSequelize().transaction(async (transaction) => {
    await DeviceKey.update({ revoked_at: new Date() }, { where: { device_id: id, revoked_at: null }, transaction });
    await DeviceKey.create({ device_id: id, prefix: key.prefix, key_hash: key.hash }, { transaction });
    await writeAudit(actor, "device.key_rotate", { type: "device", id }, { key_prefix: key.prefix }, transaction);
  });
  return { api_key: key.apiKey, prefix: key.prefix };
}

export async function revokeDeviceKeys(actor: Actor, id: string) {
  await findDevice(wholeOrganisation(actor.organisationId), id);
  return getSequelize().transaction(async (transaction) => {
    const [count] = await DeviceKey.update({ revoked_at: new Date() }, { where: { device_id: id, revoked_at: null }, transaction });
    await writeAudit(actor, "device.key_revoke", { type: "device", id }, { revoked: count }, transaction);
    return { revoked: count };
  });
}
