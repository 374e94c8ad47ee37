import { anonymous, type Agent } from "../support/session";

// Shared by the worker's API tests: send readings with a device key, provision assets and devices
// through the management API.

export async function sendReadings(apiKey: string, readings: Record<string, unknown>[]): Promise<void> {
  for (let i = 0; i < readings.length; i += 500) {
    const res = await anonymous()
      .post("/api/v1/readings")
      .set("Authorization", `Bearer ${apiKey}`)
      .set("Content-Type", "application/json")
      .send(JSON.stringify({ readings: readings.slice(i, i + 500) }));
    if (res.status !== 202 || res.body.rejected.length) throw new Error(`readings: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

export const tag = () => `${Date.now()}-${Math.random().toString(36).slice(2, 7)}`;

export async function createSite(admin: Agent, extra: Record<string, unknown> = {}) {
  const res = await admin.post("/api/sites").send({ name: `Worker site ${tag()}`, time_zone: "UTC", ...extra });
  if (res.status !== 201) throw new Error(`site: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { id: string };
}

export async function createAsset(admin: Agent, siteId: string, fields: Record<string, unknown>) {
  const res = await admin.post("/api/assets").send({ site_id: siteId, name: `Asset ${tag()}`, ...fields });
  if (res.status !== 201) throw new Error(`asset: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { id: string };
}

export interface CreatedDevice {
  id: string;
  apiKey: string;
  channels: { id: string; index: number }[];
}

export async function createDevice(admin: Agent, siteId: string, fields: Record<string, unknown>): Promise<CreatedDevice> {
  const t = tag();
  const res = await admin.post("/api/devices").send({ site_id: siteId, serial: `WK-${t}`, name: `Worker unit ${t}`, profile: "echo", ...fields });
  if (res.status !== 201) throw new Error(`device: ${res.status} ${JSON.stringify(res.body)}`);
  return { id: res.body.id, apiKey: res.body.api_key, channels: res.body.channels };
}

/** Round-trip echo time (µs) for a one-way distance at a speed of sound: t = 2·d/c (REFERENCES.md §2). */
export const echoFor = (distanceM: number, speedMs: number) => (2 * distanceM * 1e6) / speedMs;

/** Dry-air speed of sound, the "practical formula" of REFERENCES.md §1, written out here independently of the product's code. */
export const practicalSpeed = (tempC: number) => 331.3 * Math.sqrt(1 + tempC / 273.15);
