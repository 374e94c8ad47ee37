import http from "node:http";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, BASE_URL, signedIn, type Agent } from "../support/session";
import { createTankWithDevice } from "../support/fleet";
import { sql } from "../support/db";

// Device API v1 contract (PRODUCT.md "Device API v1"): every status code and the bad input of issue 3.
const post = (key: string | null, body: unknown, type = "application/json") => {
  const req = anonymous().post("/api/v1/readings").set("Content-Type", type);
  if (key !== null) req.set("Authorization", `Bearer ${key}`);
  return req.send(typeof body === "string" ? body : JSON.stringify(body));
};

const storedFor = async (deviceId: string) => Number((await sql<{ n: string }>(`SELECT count(*) AS n FROM readings WHERE device_id = $1`, [deviceId]))[0].n);

let admin: Agent;
beforeAll(async () => {
  admin = await signedIn("admin@halftrip.test");
});

describe("POST /api/v1/readings — accepted batches", () => {
  it("keeps valid readings beside rejected ones, by index, and counts resends as duplicates", async () => {
    const { apiKey, device } = await createTankWithDevice(admin);
    const at = new Date(Date.now() - 60_000).toISOString();
    const batch = {
      readings: [
        { seq: 1, at, channel: 0, echo_us: 5831.5, air_temp_c: 11.5, battery_v: 3.71, rssi_dbm: -87 },
        { seq: 2, channel: 0, samples_us: [5830, 5832, 6410, 5829, 5831] },
        { seq: 3, channel: 5, echo_us: 5831 },
      ],
    };
    const asked = Date.now();
    const first = await post(apiKey, batch);
    const answered = Date.now();
    expect(first.status).toBe(202);
    expect(first.body).toMatchObject({ accepted: 2, duplicates: 0, rejected: [{ index: 2, error: expect.stringMatching(/channel 5/) }] });
    // The server's clock is this machine's: its time falls while the request was served.
    expect(Date.parse(first.body.server_time)).toBeGreaterThanOrEqual(asked);
    expect(Date.parse(first.body.server_time)).toBeLessThanOrEqual(answered);

    const again = await post(apiKey, batch);
    expect(again.status).toBe(202);
    expect(again.body).toMatchObject({ accepted: 0, duplicates: 2 });
    expect(await storedFor(device.id)).toBe(2);

    const rows = await sql(`SELECT seq, echo_us, samples_us, air_temp_c FROM readings WHERE device_id = $1 ORDER BY seq`, [device.id]);
    expect(rows[0]).toMatchObject({ seq: "1", echo_us: 5831.5, air_temp_c: 11.5 });
    expect(rows[1].samples_us).toEqual([5830, 5832, 6410, 5829, 5831]);
    const queued = await sql(`SELECT count(*) AS n FROM reading_queue q JOIN readings r ON r.id = q.reading_id WHERE r.device_id = $1`, [device.id]);
    expect(Number(queued[0].n)).toBe(2);

    const seen = await admin.get(`/api/devices/${device.id}`).expect(200);
    expect(seen.body.last_seen_at).not.toBeNull();
    expect(seen.body.battery_v).toBe(3.71);
    expect(seen.body.rssi_dbm).toBe(-87);
  });

  it("takes each signal profile's own fields", async () => {
    const capture = await createTankWithDevice(admin, { profile: "capture", device: { clock_hz: 16_000_000, prescaler: 8, timer_bits: 16 } });
    expect((await post(capture.apiKey, { readings: [{ seq: 1, channel: 0, ticks: 11663, overflows: 0 }] })).body.accepted).toBe(1);
    expect((await post(capture.apiKey, { readings: [{ seq: 2, channel: 0, ticks: 65536 }] })).body.rejected[0].error).toMatch(/2\^16/);
    const duty = await createTankWithDevice(admin, { profile: "duty_coded", device: { zero_m: 0.2, span_m: 5 } });
    expect((await post(duty.apiKey, { readings: [{ seq: 1, channel: 0, high_us: 412, period_us: 1000 }] })).body.accepted).toBe(1);
    const pulse = await createTankWithDevice(admin, { profile: "pulse_coded", device: { us_per_mm: 1 } });
    expect((await post(pulse.apiKey, { readings: [{ seq: 1, channel: 0, pulse_us: 1500 }] })).body.accepted).toBe(1);
  });
});

describe("POST /api/v1/readings — bad readings are rejected by index and nothing of them is stored", () => {
  const future = () => new Date(Date.now() + 10 * 60_000).toISOString();
  const cases: [string, Record<string, unknown>, RegExp][] = [
    ["missing seq", { channel: 0, echo_us: 5831 }, /seq/],
    ["non-integer seq", { seq: 1.5, channel: 0, echo_us: 5831 }, /seq/],
    ["seq as a string", { seq: "7", channel: 0, echo_us: 5831 }, /seq/],
    ["channel outside the device's channels", { seq: 1, channel: 3, echo_us: 5831 }, /channel 3/],
    ["channel over 7", { seq: 1, channel: 8, echo_us: 5831 }, /channel/],
    ["two signal fields", { seq: 1, channel: 0, echo_us: 5831, pulse_us: 100 }, /only one signal/],
    ["no signal field", { seq: 1, channel: 0, air_temp_c: 10 }, /one signal/],
    ["a field of another profile", { seq: 1, channel: 0, ticks: 100 }, /echo profile/],
    ["NaN as a string", { seq: 1, channel: 0, echo_us: "NaN" }, /echo_us/],
    ["Infinity as a string", { seq: 1, channel: 0, echo_us: "Infinity" }, /echo_us/],
    ["a negative time", { seq: 1, channel: 0, echo_us: -5 }, /above 0/],
    ["an echo over 1 s", { seq: 1, channel: 0, echo_us: 1_000_001 }, /at most 1 s/],
    ["a date that does not parse", { seq: 1, channel: 0, echo_us: 5831, at: "yesterday" }, /ISO 8601/],
    ["a date with no time zone", { seq: 1, channel: 0, echo_us: 5831, at: "2026-03-14T06:30:00" }, /ISO 8601/],
    ["a date over 5 minutes ahead", { seq: 1, channel: 0, echo_us: 5831, at: future() }, /5 minutes/],
    ["an unknown extra field", { seq: 1, channel: 0, echo_us: 5831, colour: "red" }, /unknown field "colour"/],
    ["an SQL string", { seq: 1, channel: 0, echo_us: "1; DROP TABLE readings; --" }, /echo_us/],
    ["quotes and unicode in a field name", { seq: 1, channel: 0, echo_us: 5831, "ü'\"); --": 1 }, /unknown field/],
    ["a unicode string as a number", { seq: 1, channel: 0, echo_us: "５８３１" }, /echo_us/],
    ["overflows without ticks", { seq: 1, channel: 0, echo_us: 5831, overflows: 1 }, /overflows/],
  ];

  it.each(cases)("rejects %s", async (_name, reading, message) => {
    const { apiKey, device } = await createTankWithDevice(admin);
    const res = await post(apiKey, { readings: [reading, { seq: 99, channel: 0, echo_us: 5831 }] });
    expect(res.status).toBe(202);
    expect(res.body.accepted).toBe(1);
    expect(res.body.rejected).toEqual([{ index: 0, error: expect.stringMatching(message) }]);
    expect(await storedFor(device.id)).toBe(1);
  });

  it("rejects high_us ≥ period_us on a duty-coded device", async () => {
    const { apiKey } = await createTankWithDevice(admin, { profile: "duty_coded", device: { zero_m: 0.2, span_m: 5 } });
    const res = await post(apiKey, { readings: [{ seq: 1, channel: 0, high_us: 1000, period_us: 1000 }] });
    expect(res.body.rejected[0].error).toMatch(/less than period_us/);
  });

  it("rejects the same seq twice in one batch", async () => {
    const { apiKey, device } = await createTankWithDevice(admin);
    const res = await post(apiKey, { readings: [{ seq: 5, channel: 0, echo_us: 5831 }, { seq: 5, channel: 0, echo_us: 5900 }] });
    expect(res.body).toMatchObject({ accepted: 1, rejected: [{ index: 1, error: expect.stringMatching(/twice/) }] });
    const rows = await sql(`SELECT echo_us FROM readings WHERE device_id = $1`, [device.id]);
    expect(rows).toEqual([{ echo_us: 5831 }]);
  });
});

describe("POST /api/v1/readings — whole-request errors", () => {
  let apiKey: string;
  let deviceId: string;
  beforeAll(async () => {
    const made = await createTankWithDevice(admin);
    apiKey = made.apiKey;
    deviceId = made.device.id;
  });

  it.each([
    ["malformed JSON", "{ readings: [", 400, "malformed_json"],
    ["JSON that is not an object", "[1,2]", 400, "invalid_shape"],
    ["a JSON string", '"readings"', 400, "invalid_shape"],
    ["readings missing", "{}", 400, "invalid_shape"],
    ["readings empty", '{"readings":[]}', 400, "invalid_shape"],
    ["readings not an array", '{"readings":{"seq":1}}', 400, "invalid_shape"],
    ["an unknown top-level field", '{"readings":[{"seq":1,"channel":0,"echo_us":5831}],"x":1}', 400, "invalid_shape"],
  ])("answers %s with %i", async (_name, body, status, code) => {
    const res = await post(apiKey, body);
    expect(res.status).toBe(status);
    expect(res.body).toEqual({ error: code, message: expect.any(String) });
  });

  it("answers 400 for more than 500 readings", async () => {
    const readings = Array.from({ length: 501 }, (_, i) => ({ seq: i, channel: 0, echo_us: 5831 }));
    const res = await post(apiKey, { readings });
    expect(res.status).toBe(400);
    expect(res.body.message).toMatch(/500/);
  });

  it("answers 415 for a body that is not JSON", async () => {
    const res = await post(apiKey, "seq=1&channel=0", "application/x-www-form-urlencoded");
    expect(res.status).toBe(415);
    expect(res.body.error).toBe("unsupported_media_type");
  });

  it("answers 413 for a body over 256 KiB with a Content-Length", async () => {
    const res = await post(apiKey, JSON.stringify({ readings: [{ seq: 1, channel: 0, echo_us: 5831 }], pad: "x".repeat(300 * 1024) }));
    expect(res.status).toBe(413);
    expect(res.body.error).toBe("too_large");
  });

  it("answers 413 for a body over 256 KiB sent in chunks without a Content-Length", async () => {
    const status = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const url = new URL("/api/v1/readings", BASE_URL);
      const req = http.request(url, { method: "POST", headers: { Authorization: `Bearer ${apiKey}`, "Content-Type": "application/json", "Transfer-Encoding": "chunked" } }, (res) => {
        let body = "";
        res.on("data", (c) => (body += c));
        res.on("end", () => resolve({ status: res.statusCode ?? 0, body }));
      });
      req.on("error", reject);
      req.write('{"readings":[{"seq":1,"channel":0,"echo_us":5831}],"pad":"');
      for (let i = 0; i < 40; i++) req.write("y".repeat(8 * 1024));
      req.end('"}');
    });
    expect(status.status).toBe(413);
    expect(JSON.parse(status.body).error).toBe("too_large");
    expect(await storedFor(deviceId)).toBe(0);
  });
});

describe("POST /api/v1/readings — keys", () => {
  const message = async (key: string | null) => {
    const res = await post(key, { readings: [{ seq: 1, channel: 0, echo_us: 5831 }] });
    expect(res.status).toBe(401);
    expect(res.body.error).toBe("unauthorized");
    return res.body.message as string;
  };

  it("answers one 401 message for a missing, malformed, unknown, rotated-out or revoked key", async () => {
    const { apiKey, device } = await createTankWithDevice(admin);
    const unknown = apiKey.slice(0, -4) + (apiKey.endsWith("AAAA") ? "BBBB" : "AAAA");
    const messages = [await message(null), await message("not-a-key"), await message(unknown)];

    const rotated = await admin.post(`/api/devices/${device.id}/key`).expect(201);
    expect(rotated.body.api_key).toMatch(/^ht_/);
    messages.push(await message(apiKey));
    expect((await post(rotated.body.api_key, { readings: [{ seq: 1, channel: 0, echo_us: 5831 }] })).status).toBe(202);

    await admin.delete(`/api/devices/${device.id}/key`).expect(200);
    messages.push(await message(rotated.body.api_key));
    expect(new Set(messages).size).toBe(1);
  });
});

describe("POST /api/v1/readings — rate limit", () => {
  it("answers 429 with Retry-After once a device is over its requests a minute, storing nothing", async () => {
    const { apiKey, device } = await createTankWithDevice(admin, { maxRequestsPerMin: 2 });
    expect((await post(apiKey, { readings: [{ seq: 1, channel: 0, echo_us: 5831 }] })).status).toBe(202);
    expect((await post(apiKey, { readings: [{ seq: 2, channel: 0, echo_us: 5831 }] })).status).toBe(202);
    const third = await post(apiKey, { readings: [{ seq: 3, channel: 0, echo_us: 5831 }] });
    expect(third.status).toBe(429);
    expect(third.body.error).toBe("rate_limited");
    const retryAfter = Number(third.headers["retry-after"]);
    expect(retryAfter).toBeGreaterThanOrEqual(1);
    expect(retryAfter).toBeLessThanOrEqual(60);
    expect(await storedFor(device.id)).toBe(2);
  });
});
