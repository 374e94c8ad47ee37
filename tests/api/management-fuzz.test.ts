import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { createTankWithDevice } from "../support/fleet";
import { createOtherOrganisation } from "../support/db";
import { signedIn, type Agent } from "../support/session";

// Issue 14: a property-based fuzz of the management API's JSON bodies. Whatever the body, the answer is
// never a 500: bad shapes, NUL characters, lone surrogates, huge numbers and odd dates are the client's
// problem (4xx). Runs as a second organisation's admin so that what it creates stays out of the demo's way.
let admin: Agent;
let fleet: Awaited<ReturnType<typeof createTankWithDevice>>;
const ALARM = "00000000-0000-4000-8000-000000000000";

beforeAll(async () => {
  const other = await createOtherOrganisation();
  admin = await signedIn(other.adminEmail, other.password);
  fleet = await createTankWithDevice(admin);
});

// Strings that have broken things before, beside arbitrary ones (including lone surrogates).
const nasty = fc.constantFrom("\u0000", "a\u0000b", "\ud800", "x\udc00", "-004714-11-24T00:00:00Z", "9999-12-31", "1e309", "NaN", "", " ", "<script>", "'; --", "𝔘𝔫𝔦", "x".repeat(5000));
const text = fc.oneof(fc.string({ unit: "binary", maxLength: 40 }), nasty);
const number = fc.oneof(fc.double({ noNaN: true }), fc.integer(), fc.constantFrom(0, -1, 1e308, -1e308, 2 ** 53, Number.MIN_VALUE));
const leaf = fc.oneof(text, number, fc.boolean(), fc.constant(null));
const value = fc.letrec((tie) => ({
  v: fc.oneof({ depthSize: "small", withCrossShrink: true }, leaf, fc.array(tie("v"), { maxLength: 4 }), fc.dictionary(text, tie("v"), { maxKeys: 4 })),
})).v;

/** Bodies built from a route's own field names with arbitrary values, and arbitrary JSON altogether. */
const bodyOf = (keys: string[]) =>
  fc.oneof(
    fc.record(Object.fromEntries(keys.map((k) => [k, value])), { requiredKeys: [] }),
    fc.record(Object.fromEntries(keys.map((k) => [k, leaf])), { requiredKeys: [] }),
    value,
  );

const SITE = ["name", "time_zone", "latitude", "longitude", "air_temp_c", "humidity_pct", "temperature_channel_id", "escalation_delay_min"];
const ASSET = ["site_id", "kind", "name", "mount_height_m", "safe_fill_pct", "reorder_pct", "floor_distance_m", "occupied_below_m", "geometry", "bay_row", "bay_col", "bay_level"];
const DEVICE = ["site_id", "serial", "name", "profile", "clock_hz", "prescaler", "timer_bits", "us_per_mm", "zero_m", "span_m", "expected_interval_s", "max_requests_per_min", "firmware", "channels"];

const routes: { method: "post" | "patch" | "put"; path: () => string; label: string; keys: string[] }[] = [
  { method: "post", path: () => "/api/sites", label: "/api/sites", keys: SITE },
  { method: "patch", path: () => `/api/sites/${fleet.site.id}`, label: "/api/sites/{id}", keys: SITE },
  { method: "post", path: () => "/api/assets", label: "/api/assets", keys: ASSET },
  { method: "patch", path: () => `/api/assets/${fleet.tank.id}`, label: "/api/assets/{id}", keys: ASSET },
  { method: "post", path: () => "/api/devices", label: "/api/devices", keys: DEVICE },
  { method: "patch", path: () => `/api/devices/${fleet.device.id}`, label: "/api/devices/{id}", keys: DEVICE },
  { method: "post", path: () => "/api/users", label: "/api/users", keys: ["email", "name", "role"] },
  { method: "post", path: () => `/api/assets/${fleet.tank.id}/dips`, label: "/api/assets/{id}/dips", keys: ["at", "level_m", "note"] },
  { method: "put", path: () => `/api/assets/${fleet.tank.id}/setpoints`, label: "/api/assets/{id}/setpoints", keys: ["unit", "setpoints", "rate_of_change"] },
  { method: "put", path: () => `/api/sites/${fleet.site.id}/on-call`, label: "/api/sites/{id}/on-call", keys: ["user_ids"] },
  { method: "post", path: () => "/api/imports", label: "/api/imports", keys: ["kind", "target_id", "file_name", "size_bytes", "mode"] },
  { method: "post", path: () => `/api/channels/${fleet.device.channels[0].id}/calibration/preview`, label: "/api/channels/{id}/calibration/preview", keys: ["dip_ids", "note"] },
  { method: "post", path: () => "/api/alarms/acknowledge", label: "/api/alarms/acknowledge", keys: ["ids", "comment"] },
  { method: "post", path: () => `/api/alarms/${ALARM}/shelve`, label: "/api/alarms/{id}/shelve", keys: ["reason", "until", "duration_min", "comment"] },
  { method: "post", path: () => `/api/alarms/${ALARM}/out-of-service`, label: "/api/alarms/{id}/out-of-service", keys: ["reason", "comment"] },
  { method: "post", path: () => `/api/dips/${ALARM}/void`, label: "/api/dips/{id}/void", keys: ["reason"] },
  { method: "post", path: () => `/api/imports/${ALARM}/read-as-fahrenheit`, label: "/api/imports/{id}/read-as-fahrenheit", keys: ["lines"] },
];

describe("management API under arbitrary JSON bodies", () => {
  it.each(routes.map((r) => [`${r.method.toUpperCase()} ${r.label}`, r] as const))("never answers 500: %s", async (_name, r) => {
    await fc.assert(
      fc.asyncProperty(bodyOf(r.keys), async (body) => {
        const res = await admin[r.method](r.path()).set("Content-Type", "application/json").send(JSON.stringify(body));
        expect(res.status, `${r.method} ${r.path()} ${JSON.stringify(body).slice(0, 300)} → ${JSON.stringify(res.body).slice(0, 300)}`).toBeLessThan(500);
      }),
      { numRuns: 40, seed: Number(process.env.FUZZ_SEED ?? 20261204) },
    );
  }, 120_000);
});
