import type { Agent } from "./session";

// Provisioning through the management API, as an admin would.
export async function createTankWithDevice(
  admin: Agent,
  opts: { profile?: string; asset?: Record<string, unknown>; device?: Record<string, unknown>; channels?: number[]; maxRequestsPerMin?: number } = {},
) {
  const tag = `${Date.now()}-${Math.random().toString(36).slice(2, 7)}`;
  const site = await admin.post("/api/sites").send({ name: `Test site ${tag}`, time_zone: "Europe/Dublin" });
  if (site.status !== 201) throw new Error(`site: ${site.status} ${JSON.stringify(site.body)}`);
  const tank = await admin.post("/api/assets").send({
    site_id: site.body.id,
    kind: "tank",
    name: `Tank ${tag}`,
    mount_height_m: 3,
    safe_fill_pct: 90,
    reorder_pct: 25,
    geometry: { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 },
    ...(opts.asset ?? {}),
  });
  if (tank.status !== 201) throw new Error(`asset: ${tank.status} ${JSON.stringify(tank.body)}`);
  const channels = (opts.channels ?? [0]).map((index) => ({ index, asset_id: index === 0 ? tank.body.id : null }));
  const device = await admin.post("/api/devices").send({
    site_id: site.body.id,
    serial: `SN-${tag}`,
    name: `Unit ${tag}`,
    profile: opts.profile ?? "echo",
    channels,
    ...(opts.maxRequestsPerMin ? { max_requests_per_min: opts.maxRequestsPerMin } : {}),
    ...(opts.device ?? {}),
  });
  if (device.status !== 201) throw new Error(`device: ${device.status} ${JSON.stringify(device.body)}`);
  return { site: site.body, tank: tank.body, device: device.body, apiKey: device.body.api_key as string };
}
