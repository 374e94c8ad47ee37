import { deviceKeyMatches, prefixOfDeviceKey } from "../auth/device-keys";
import { describeZodError, HttpError } from "../http/errors";
import { findDeviceByKeyPrefix, storeReadings, type KeyedDevice } from "../services/ingest";
import { batchSchema, checkReadingForDevice, MAX_BODY_BYTES, readingSchema, type ReadingInput } from "../validations/reading";
import { readBodyWithLimit } from "../http/errors";

// One message for every key problem, so a caller learns nothing about which part was wrong.
const BAD_KEY = "Send a valid device key as 'Authorization: Bearer <key>'.";

export async function authenticateDevice(req: Request): Promise<KeyedDevice> {
  const header = req.headers.get("authorization") ?? "";
  const m = /^Bearer\s+(\S+)$/i.exec(header);
  const key = m?.[1] ?? "";
  const prefix = prefixOfDeviceKey(key);
  if (!prefix) throw new HttpError(401, "unauthorized", BAD_KEY);
  const device = await findDeviceByKeyPrefix(prefix);
  if (!device || !deviceKeyMatches(key, device.key_hash)) throw new HttpError(401, "unauthorized", BAD_KEY);
  return device;
}

export interface Rejection {
  index: number;
  error: string;
}

export function validateBatch(items: unknown[], device: KeyedDevice, now: number): { valid: ReadingInput[]; rejected: Rejection[] } {
  const valid: ReadingInput[] = [];
  const rejected: Rejection[] = [];
  const seen = new Set<string>();
  items.forEach((item, index) => {
    const parsed = readingSchema.safeParse(item);
    if (!parsed.success) return rejected.push({ index, error: describeZodError(parsed.error) });
    const problem = checkReadingForDevice(parsed.data, { profile: device.profile, timerBits: device.timer_bits, channels: device.channels }, now);
    if (problem) return rejected.push({ index, error: problem });
    const key = `${parsed.data.channel}:${parsed.data.seq}`;
    if (seen.has(key)) return rejected.push({ index, error: `seq ${parsed.data.seq} appears twice for channel ${parsed.data.channel} in this batch.` });
    seen.add(key);
    valid.push(parsed.data);
  });
  return { valid, rejected };
}

/** The whole Device API v1 exchange: key, media type, size, shape, per-reading rules, rate limit, storage. */
export async function acceptReadings(req: Request): Promise<Response> {
  const device = await authenticateDevice(req);
  const type = req.headers.get("content-type") ?? "";
  if (!/^application\/json\b/i.test(type)) throw new HttpError(415, "unsupported_media_type", "Send the body as JSON with 'Content-Type: application/json'.");
  const text = await readBodyWithLimit(req, MAX_BODY_BYTES, "send fewer readings a request");
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw new HttpError(400, "malformed_json", "The body is not valid JSON.");
  }
  if (typeof body !== "object" || body === null || Array.isArray(body)) {
    throw new HttpError(400, "invalid_shape", 'The body must be a JSON object: { "readings": [ … ] }.');
  }
  const shape = batchSchema.safeParse(body);
  if (!shape.success) throw new HttpError(400, "invalid_shape", describeZodError(shape.error));
  const serverTime = new Date();
  const { valid, rejected } = validateBatch(shape.data.readings, device, serverTime.getTime());
  const stored = await storeReadings(device.id, valid, serverTime);
  if (stored.limited) {
    throw new HttpError(429, "rate_limited", "This device is over its request rate; wait and resend the same batch.", { "Retry-After": String(stored.retryAfterS) });
  }
  return Response.json(
    { accepted: stored.accepted, duplicates: valid.length - stored.accepted, rejected, server_time: serverTime.toISOString() },
    { status: 202 },
  );
}
