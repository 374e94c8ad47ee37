import { createHmac, timingSafeEqual } from "node:crypto";
import { env } from "../env";

// An invite link carries the invite id and its expiry, signed with the server's secret; the database
// row makes it single-use. Tampering with either part breaks the signature.
function sign(payload: string, purpose: string): string {
  return createHmac("sha256", env.authSecret).update(`${purpose}:${payload}`).digest("base64url");
}

export function createSignedToken(id: string, expiresAt: Date, purpose: string): string {
  const payload = `${id}.${Math.floor(expiresAt.getTime() / 1000)}`;
  return `${payload}.${sign(payload, purpose)}`;
}

export type TokenCheck = { ok: true; id: string; expiresAt: Date } | { ok: false; reason: "malformed" | "bad_signature" | "expired" };

export function verifySignedToken(token: string, purpose: string, now = new Date()): TokenCheck {
  const parts = token.split(".");
  if (parts.length !== 3 || !/^[0-9a-f-]{36}$/.test(parts[0]) || !/^\d+$/.test(parts[1])) return { ok: false, reason: "malformed" };
  const expected = Buffer.from(sign(`${parts[0]}.${parts[1]}`, purpose));
  const given = Buffer.from(parts[2]);
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return { ok: false, reason: "bad_signature" };
  const expiresAt = new Date(Number(parts[1]) * 1000);
  if (expiresAt <= now) return { ok: false, reason: "expired" };
  return { ok: true, id: parts[0], expiresAt };
}
