import { sqlRows, sqlRun } from "../db/sql";
import { env } from "../env";

// Sign-in throttling, counted in PostgreSQL so it holds across web instances (migration 0008).
//
// Per client address: FREE_ADDRESS_ATTEMPTS attempts an hour, then each further attempt waits twice as long
// as the one before (1 s, 2 s, 4 s … at most 15 min) after the last. This slows one address guessing
// one account and one address spraying one password over many accounts alike.
// Per account: ACCOUNT_LIMIT attempts in ACCOUNT_WINDOW_MINUTES, then the account refuses further attempts
// until the window moves on — but only from addresses that have not signed in to it successfully within
// KNOWN_ADDRESS_DAYS, so a stranger cannot lock the owner out.
//
// An attempt is counted before its password is checked, in one statement (the upsert's row lock orders
// simultaneous attempts), and a success takes its own count back; so thirty wrong passwords sent at once
// are not all checked.
export const FREE_ADDRESS_ATTEMPTS = 5;
export const ADDRESS_WINDOW_MINUTES = 60;
export const MAX_ADDRESS_DELAY_S = 15 * 60;
export const ACCOUNT_LIMIT = 10;
export const ACCOUNT_WINDOW_MINUTES = 15;
export const KNOWN_ADDRESS_DAYS = 30;

/**
 * One counter's upsert (`source` gives its new row): a new window starts once the old one is over;
 * otherwise the attempt is counted only when `allowed` holds for the row as it stood (else the row is left alone and nothing returned).
 */
function countAttempt(windowMinutes: string, source: string, allowed: string): string {
  const windowOver = `c.window_started_at < now() - make_interval(mins => ${windowMinutes})`;
  return `INSERT INTO sign_in_counters AS c (scope, key, attempts, window_started_at, last_attempt_at) ${source}
       ON CONFLICT (scope, key) DO UPDATE SET
         attempts = CASE WHEN ${windowOver} THEN 1 ELSE c.attempts + 1 END,
         window_started_at = CASE WHEN ${windowOver} THEN now() ELSE c.window_started_at END,
         last_attempt_at = now()
       WHERE ${windowOver} OR ${allowed}
       RETURNING 1`;
}

export type SignInClaim = { ok: true } | { ok: false; reason: "address" | "account"; retryAfterS: number };

/** Counts one attempt for the account and the address, or refuses it without counting. */
export async function claimSignInAttempt(email: string, address: string): Promise<SignInClaim> {
  const rows = await sqlRows<{ address_ok: boolean; account_ok: boolean; address_retry_s: number | null; account_retry_s: number | null }>(
    `WITH known AS (
       SELECT EXISTS (
         SELECT 1 FROM sign_in_known_addresses
         WHERE email = :email AND address = :address AND last_success_at > now() - make_interval(days => :knownDays)
       ) AS yes
     ),
     addr AS (${countAttempt(":addressWindow", "VALUES ('address', :address, 1, now(), now())", "c.attempts < :freeAttempts OR now() >= c.last_attempt_at + make_interval(secs => least(:maxDelay, power(2, c.attempts - :freeAttempts)))")}),
     acct AS (${countAttempt(":accountWindow", "SELECT 'account', :email, 1, now(), now() WHERE EXISTS (SELECT 1 FROM addr)", "c.attempts < :accountLimit OR (SELECT yes FROM known)")})
     SELECT EXISTS (SELECT 1 FROM addr) AS address_ok,
            EXISTS (SELECT 1 FROM acct) AS account_ok,
            (SELECT ceil(extract(epoch FROM last_attempt_at + make_interval(secs => least(:maxDelay, power(2, attempts - :freeAttempts))) - now()))::int
               FROM sign_in_counters WHERE scope = 'address' AND key = :address) AS address_retry_s,
            (SELECT ceil(extract(epoch FROM window_started_at + make_interval(mins => :accountWindow) - now()))::int
               FROM sign_in_counters WHERE scope = 'account' AND key = :email) AS account_retry_s`,
    {
      email: email.toLowerCase(),
      address,
      knownDays: KNOWN_ADDRESS_DAYS,
      addressWindow: ADDRESS_WINDOW_MINUTES,
      accountWindow: ACCOUNT_WINDOW_MINUTES,
      freeAttempts: FREE_ADDRESS_ATTEMPTS,
      maxDelay: MAX_ADDRESS_DELAY_S,
      accountLimit: ACCOUNT_LIMIT,
    },
    // The statement writes (its CTEs upsert the counters), so it must reach the primary.
    { primary: true },
  );
  const r = rows[0];
  if (!r.address_ok) return { ok: false, reason: "address", retryAfterS: Math.max(1, r.address_retry_s ?? 1) };
  if (!r.account_ok) return { ok: false, reason: "account", retryAfterS: Math.max(1, r.account_retry_s ?? 1) };
  return { ok: true };
}

/** A success: the account's count starts again, the address gets its attempt back and becomes known. */
export async function recordSignInSuccess(email: string, address: string) {
  await sqlRun(
    `WITH acct AS (DELETE FROM sign_in_counters WHERE scope = 'account' AND key = :email),
          addr AS (UPDATE sign_in_counters SET attempts = greatest(attempts - 1, 0) WHERE scope = 'address' AND key = :address)
     INSERT INTO sign_in_known_addresses (email, address, last_success_at) VALUES (:email, :address, now())
     ON CONFLICT (email, address) DO UPDATE SET last_success_at = now()`,
    { email: email.toLowerCase(), address },
  );
}

/**
 * The client's address as the nearest trusted hop saw it. HALFTRIP_PROXY_HOPS is the number of reverse
 * proxies in front of the web server (each appends to X-Forwarded-For); with none, Next.js fills the
 * header with the socket's address unless the client sent one, so production belongs behind a proxy.
 */
export function clientAddress(headers: Headers): string {
  const hops = env.proxyHops;
  const chain = (headers.get("x-forwarded-for") ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  const picked = chain[Math.max(0, chain.length - 1 - Math.max(0, hops - 1))];
  return (picked ?? "unknown").slice(0, 64);
}
