import { z } from "zod";

export const uuidSchema = z.string().uuid("Use the id as the API gave it.");

export function isUuid(value: string): boolean {
  return uuidSchema.safeParse(value).success;
}

// PostgreSQL cannot store a NUL character in text, and a lone UTF-16 surrogate is not a character at all
// (it turns into U+FFFD or an error on the way to the database). Every text field refuses both.
const MALFORMED_TEXT = /[\u0000]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;
export const MALFORMED_TEXT_MESSAGE = "Remove the NUL or broken (lone surrogate) character from this text.";

export function isWellFormedText(value: string): boolean {
  return !MALFORMED_TEXT.test(value);
}

/** A text field: a string with no NUL and no lone surrogate. Use instead of z.string() everywhere. */
export function text(params?: Parameters<typeof z.string>[0]) {
  return z.string(params).refine(isWellFormedText, MALFORMED_TEXT_MESSAGE);
}

// Times from clients: nothing before the Unix epoch (no reading or alarm of ours is older) and nothing
// more than MAX_FUTURE_YEARS ahead; outside that the database's date arithmetic is meaningless or fails.
export const MIN_INSTANT_MS = Date.UTC(1970, 0, 1);
export const MAX_FUTURE_YEARS = 5;

export function maxInstantMs(now = Date.now()): number {
  return now + MAX_FUTURE_YEARS * 366 * 86_400_000;
}

export function isSaneInstant(d: Date): boolean {
  const t = d.getTime();
  return Number.isFinite(t) && t >= MIN_INSTANT_MS && t <= maxInstantMs();
}

export const INSTANT_RANGE_MESSAGE = `Use a time between 1970 and ${MAX_FUTURE_YEARS} years from now.`;
