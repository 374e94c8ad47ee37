import fs from "node:fs";
import path from "node:path";
import { DEMO_EXPECTED_INTERVAL_S, DEMO_ASSETS, DEMO_SITES, type DemoDevice } from "./demo-plan";
import type { DemoKeysFile, SimChannel, SimDevice } from "../../workers/simulation/keys-file";
import { parseKeysFile } from "../../workers/simulation/keys-file";

/** Database ids of one demo device and its surroundings, and its plain key. */
export interface DemoDeviceRefs {
  deviceId: string;
  apiKey: string;
  siteId: string;
  /** Plan asset key → asset id, for the assets still tied to the device's channels. */
  assetIds: Record<string, string>;
}

/** The keys-file entry of a demo device: the plan's sizes and habits with the database's ids and the key. */
export function simDeviceFromPlan(device: DemoDevice, refs: DemoDeviceRefs): SimDevice {
  const site = DEMO_SITES.find((s) => s.key === device.site);
  if (!site) throw new Error(`demo plan: device ${device.serial} names no site`);
  const channels = device.channels.flatMap((c): SimChannel[] => {
    const asset = DEMO_ASSETS.find((a) => a.key === c.asset);
    const assetId = refs.assetIds[c.asset];
    if (!asset || !assetId) return [];
    const base = { index: c.index, asset_id: assetId, asset_name: asset.name, min_range_m: c.min_range_m, max_range_m: c.max_range_m, fault: c.fault ?? null, temperature_source: c.temperature_source ?? false };
    if (asset.kind === "tank") return [{ ...base, kind: "tank", mount_height_m: asset.mount_height_m, geometry: asset.geometry, usage: asset.usage }];
    return [{ ...base, kind: "bay", floor_distance_m: asset.floor_distance_m, occupied_below_m: asset.occupied_below_m, popularity: asset.popularity }];
  });
  return {
    serial: device.serial,
    id: refs.deviceId,
    api_key: refs.apiKey,
    name: device.name,
    profile: device.profile,
    expected_interval_s: DEMO_EXPECTED_INTERVAL_S,
    site: { id: refs.siteId, name: site.name, time_zone: site.time_zone, mean_temp_c: site.climate.mean_temp_c, daily_swing_c: site.climate.daily_swing_c, humidity_pct: site.humidity_pct },
    timing: {
      clock_hz: device.clock_hz ?? null,
      prescaler: device.prescaler ?? null,
      timer_bits: device.timer_bits ?? null,
      us_per_mm: device.us_per_mm ?? null,
      zero_m: device.zero_m ?? null,
      span_m: device.span_m ?? null,
      period_us: device.period_us ?? null,
    },
    behaviour: device.behaviour,
    channels,
  };
}

/** The keys file at a path, or null when it is missing or unreadable. */
export function readDemoKeysFile(file: string): DemoKeysFile | null {
  try {
    return parseKeysFile(fs.readFileSync(file, "utf8"));
  } catch {
    return null;
  }
}

/** Writes the keys file readable by its owner only, replacing it in one step so the simulator never reads half a file. */
export function writeDemoKeysFile(file: string, devices: SimDevice[]): void {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const body: DemoKeysFile = { written_at: new Date().toISOString(), devices };
  const tmp = `${file}.${process.pid}.tmp`;
  fs.writeFileSync(tmp, JSON.stringify(body, null, 2) + "\n", { mode: 0o600 });
  fs.renameSync(tmp, file);
}
