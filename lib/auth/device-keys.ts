import { createHash, randomBytes, timingSafeEqual } from "node:crypto";

// A device key reads "ht_<prefix>_<secret>": the prefix finds the row, only a SHA-256 of the whole key is
// stored. The secret carries 256 bits, so a fast hash is enough (no password stretching needed).
export interface NewDeviceKey {
  apiKey: string;
  prefix: string;
  hash: Buffer;
}

export function generateDeviceKey(): NewDeviceKey {
  const prefix = randomBytes(6).toString("hex");
  const apiKey = `ht_${prefix}_${randomBytes(32).toString("base64url")}`;
  return { apiKey, prefix, hash: hashDeviceKey(apiKey) };
}

export function hashDeviceKey(apiKey: string): Buffer {
  return createHash("sha256").update(apiKey).digest();
}

/** The prefix of a well-formed key, or null for anything else. */
export function prefixOfDeviceKey(apiKey: string): string | null {
  const m = /^ht_([0-9a-f]{12})_[A-Za-z0-9_-]{43}$/.exec(apiKey);
  return m ? m[1] : null;
}

export function deviceKeyMatches(apiKey: string, storedHash: Buffer): boolean {
  const given = hashDeviceKey(apiKey);
  return given.length === storedHash.length && timingSafeEqual(given, storedHash);
}
