import SwaggerParser from "@apidevtools/swagger-parser";
import Ajv, { type ValidateFunction } from "ajv";
import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { openApi30ToJsonSchema } from "../support/openapi";

// POST /api/v1/readings fuzzed with generated requests: valid batches, near-valid ones (one field
// broken) and garbage (any JSON, any text, bytes that are not UTF-8, oversized bodies, wrong keys and
// media types). Whatever arrives, the route never answers 500 and every answer — status, JSON body,
// Retry-After — is one the OpenAPI document served at /api/v1/openapi.json describes.

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any -- a JSON document read field by field

let keys: { echo: string; capture: string };
let documented: Json;
let bodyValidators: Record<string, ValidateFunction>;
let readingValidator: ValidateFunction;

beforeAll(async () => {
  const doc = (await anonymous().get("/api/v1/openapi.json").expect(200)).body;
  const deref = (await SwaggerParser.dereference(structuredClone(doc))) as Json;
  documented = deref.paths["/api/v1/readings"].post.responses;
  const ajv = new Ajv({ strict: false });
  ajv.addFormat("date-time", (s: string) => Number.isFinite(Date.parse(s)));
  bodyValidators = Object.fromEntries(Object.entries(documented).map(([status, r]) => [status, ajv.compile(openApi30ToJsonSchema((r as Json).content["application/json"].schema) as Json)]));
  readingValidator = ajv.compile(openApi30ToJsonSchema(deref.components.schemas.Reading) as Json);
  const admin = await signedIn("admin@halftrip.test");
  // Rate limits high enough that the fuzz reaches validation rather than 429 on every request.
  const echo = await createTankWithDevice(admin, { channels: [0, 1], maxRequestsPerMin: 100_000 });
  const capture = await createTankWithDevice(admin, { profile: "capture", device: { clock_hz: 16_000_000, prescaler: 8, timer_bits: 16 }, maxRequestsPerMin: 100_000 });
  keys = { echo: echo.apiKey, capture: capture.apiKey };
}, 120_000);

// Readings the device must take: its own channels and signal, dated in the past (the future limit is
// 5 minutes, so "now minus at least a minute" stays valid however slow the run is).
const pastInstant = fc.integer({ min: 60_000, max: 400 * 86_400_000 }).map((ago) => new Date(Date.now() - ago).toISOString());
const time = fc.double({ min: 1, max: 1_000_000, noNaN: true });
const common = {
  seq: fc.oneof(fc.nat(), fc.integer({ min: 0, max: Number.MAX_SAFE_INTEGER })),
  channel: fc.constantFrom(0, 1),
  at: pastInstant,
  air_temp_c: fc.double({ min: -60, max: 90, noNaN: true }),
  battery_v: fc.double({ min: 0, max: 60, noNaN: true }),
  rssi_dbm: fc.double({ min: -200, max: 0, noNaN: true }).map((v) => (Object.is(v, -0) ? 0 : v)),
};
const echoReading = fc.oneof(
  fc.record({ ...common, echo_us: time }, { requiredKeys: ["seq", "channel", "echo_us"] }),
  fc.record({ ...common, samples_us: fc.array(time, { minLength: 1, maxLength: 32 }) }, { requiredKeys: ["seq", "channel", "samples_us"] }),
);
const captureReading = fc.record({ ...common, channel: fc.constant(0), ticks: fc.integer({ min: 0, max: 65_535 }), overflows: fc.integer({ min: 0, max: 100_000 }) }, {
  requiredKeys: ["seq", "channel", "ticks"],
});

// One field broken: a wrong type, a value out of range, a field missing, a field too many.
const badValue = fc.oneof(
  fc.constantFrom(null, true, "", "NaN", "Infinity", "-1", [], {}, -1, -0.5, 1.5, 1e308, -1e308, 2 ** 53, 2 ** 32, 1_000_001, "2026-13-45T99:99:99Z", "\u0000", "😀"),
  fc.jsonValue({ maxDepth: 2 }),
);
const fieldName = fc.constantFrom("seq", "channel", "at", "echo_us", "samples_us", "ticks", "overflows", "pulse_us", "high_us", "period_us", "air_temp_c", "battery_v", "rssi_dbm", "extra", "__proto__", "constructor");
const nearValid = fc.tuple(fc.oneof(echoReading, captureReading), fieldName, badValue, fc.boolean()).map(([reading, field, value, remove]) => {
  const copy: Json = { ...reading };
  if (remove) delete copy[field];
  else Object.defineProperty(copy, field, { value, enumerable: true, writable: true, configurable: true });
  return copy;
});

type Item = { kind: "valid" | "other"; value: unknown };
const item = (readings: fc.Arbitrary<unknown>) =>
  fc.oneof(
    { weight: 4, arbitrary: readings.map((value): Item => ({ kind: "valid", value })) },
    { weight: 3, arbitrary: nearValid.map((value): Item => ({ kind: "other", value })) },
    { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 3 }).map((value): Item => ({ kind: "other", value })) },
  );

interface Request {
  key: "echo" | "capture" | string | null;
  contentType: string | null;
  body: string | Buffer;
  /** The readings sent, when the body is a batch. */
  items?: Item[];
}

const batchRequest = fc.tuple(fc.constantFrom("echo" as const, "capture" as const), fc.integer({ min: 1, max: 40 })).chain(([device, max]) =>
  fc.array(item(device === "echo" ? echoReading : captureReading), { minLength: 1, maxLength: max }).map((items): Request => ({
    key: device,
    contentType: "application/json",
    body: JSON.stringify({ readings: items.map((i) => i.value) }),
    items,
  })),
);

const garbageBody = fc.oneof(
  fc.record({ readings: fc.jsonValue({ maxDepth: 3 }) }).map((b) => JSON.stringify(b)),
  fc.record({ readings: fc.array(echoReading, { maxLength: 3 }), extra: fc.jsonValue({ maxDepth: 1 }) }).map((b) => JSON.stringify(b)),
  fc.constant(JSON.stringify({ readings: [] })),
  fc.constant(JSON.stringify({ readings: Array.from({ length: 501 }, (_, i) => ({ seq: i, channel: 0, echo_us: 5831 })) })),
  fc.jsonValue({ maxDepth: 4 }).map((v) => JSON.stringify(v) ?? "null"),
  fc.string({ unit: "binary", maxLength: 200 }),
  echoReading.map((r) => JSON.stringify({ readings: [r] })).chain((s) => fc.nat({ max: s.length - 1 }).map((n) => s.slice(0, n))),
  fc.uint8Array({ minLength: 1, maxLength: 200 }).map((bytes) => Buffer.from([0xff, 0xfe, ...bytes])),
  fc.integer({ min: 1000, max: 20_000 }).map((depth) => "[".repeat(depth) + "]".repeat(depth)),
  fc.constant(JSON.stringify({ readings: [{ seq: 1, channel: 0, echo_us: 5831 }], pad: "x".repeat(300 * 1024) })),
);

const garbageRequest = fc
  .tuple(
    garbageBody,
    fc.oneof({ weight: 6, arbitrary: fc.constantFrom("echo", "capture") }, { weight: 1, arbitrary: fc.constantFrom(null, "", "Bearer", "ht_not-a-key", "Basic YWRtaW46YWRtaW4=") }),
    fc.oneof({ weight: 6, arbitrary: fc.constant("application/json") }, { weight: 1, arbitrary: fc.constantFrom(null, "application/json; charset=utf-8", "APPLICATION/JSON", "text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x") }),
  )
  .map(([body, key, contentType]): Request => ({ key, contentType, body }));

async function send(req: Request) {
  const call = anonymous().post("/api/v1/readings");
  if (req.key !== null) call.set("Authorization", req.key === "echo" || req.key === "capture" ? `Bearer ${keys[req.key]}` : req.key);
  if (req.contentType !== null) call.set("Content-Type", req.contentType);
  return call.send(req.body);
}

describe("POST /api/v1/readings under generated requests", () => {
  it("never answers 500, and every answer matches the OpenAPI document", async () => {
    const seen: Record<string, number> = {};
    await fc.assert(
      fc.asyncProperty(fc.oneof({ weight: 3, arbitrary: batchRequest }, { weight: 2, arbitrary: garbageRequest }), async (req) => {
        const res = await send(req);
        seen[res.status] = (seen[res.status] ?? 0) + 1;
        const status = String(res.status);
        expect(Object.keys(documented), `undocumented status ${status}: ${res.text.slice(0, 300)}`).toContain(status);
        expect(res.headers["content-type"]).toMatch(/^application\/json\b/);
        const valid = bodyValidators[status];
        expect(valid(res.body), `${status} body ${res.text.slice(0, 300)}: ${JSON.stringify(valid.errors)}`).toBe(true);
        if (documented[status].headers?.["Retry-After"]) expect(res.headers["retry-after"]).toMatch(/^\d+$/);
        if (res.status !== 202 || !req.items) return;
        // Every reading is counted once: stored, a duplicate of an earlier one, or rejected by index.
        const rejected: { index: number }[] = res.body.rejected;
        expect(res.body.accepted + res.body.duplicates + rejected.length).toBe(req.items.length);
        const rejectedAt = new Set(rejected.map((r) => r.index));
        expect(rejectedAt.size).toBe(rejected.length);
        const firstOfKey = new Map<string, number>();
        req.items.forEach((it, index) => {
          expect(index >= 0 && index < req.items!.length).toBe(true);
          // What the document's Reading schema refuses, the route refuses too.
          if (!readingValidator(it.value)) expect(rejectedAt.has(index), `index ${index} ${JSON.stringify(it.value)}`).toBe(true);
          if (it.kind !== "valid") return;
          const r = it.value as { seq: number; channel: number };
          const key = `${r.channel}:${r.seq}`;
          // A valid reading is taken unless an earlier one in the batch had its channel and seq.
          if (!firstOfKey.has(key)) {
            firstOfKey.set(key, index);
            expect(rejectedAt.has(index), `valid reading ${index} ${JSON.stringify(r)} rejected: ${JSON.stringify(res.body.rejected)}`).toBe(false);
          }
        });
      }),
      { numRuns: 300, interruptAfterTimeLimit: 150_000, markInterruptAsFailure: false },
    );
    // The run reached both the batch path and the refusals.
    expect(seen[202]).toBeGreaterThan(0);
    expect(Object.keys(seen).length).toBeGreaterThan(2);
  }, 240_000);
});
