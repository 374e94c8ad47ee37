import { sqlRows, sqlRun } from "../db/sql";

// 10 failed sign-ins for one e-mail within 15 minutes → refuse further attempts until the window moves on.
export const MAX_FAILURES = 10;
export const WINDOW_MINUTES = 15;

export async function countRecentFailures(email: string): Promise<number> {
  // On the primary: a failure recorded a moment ago must count.
  const rows = await sqlRows<{ n: string }>(
    `SELECT count(*) AS n FROM sign_in_failures WHERE lower(email) = lower(:email) AND at > now() - make_interval(mins => :mins)`,
    { email, mins: WINDOW_MINUTES },
    { primary: true },
  );
  return Number(rows[0]?.n ?? 0);
}

export async function isSignInThrottled(email: string): Promise<boolean> {
  return (await countRecentFailures(email)) >= MAX_FAILURES;
}

export async function recordSignInFailure(email: string) {
  await sqlRun(`INSERT INTO sign_in_failures (email) VALUES (:email)`, { email });
}

export async function clearSignInFailures(email: string) {
  await sqlRun(`DELETE FROM sign_in_failures WHERE lower(email) = lower(:email)`, { email });
}
