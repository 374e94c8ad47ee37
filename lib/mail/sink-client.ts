import { env as settings } from "../env";

// Reads what the local SMTP sink caught. The sink is a development fake: it exists only where
// MAIL_SINK_URL is set, and never in production unless the local stack (scripts/stack.mjs, which runs
// the sink itself on 127.0.0.1) says so. An admin sees only mail addressed to members of their own
// organisation, so no invite or acknowledge link of another organisation is ever shown.
export interface CaughtMessage {
  id: string;
  received_at: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

type Env = Record<string, string | undefined>;

/** The sink's URL when the sink may be shown here, else null (the page and API then answer 404). */
export function mailSinkUrl(env: Env = settings.mailSinkSettings): string | null {
  const url = env.MAIL_SINK_URL;
  if (!url) return null;
  if (env.NODE_ENV === "production" && env.HALFTRIP_LOCAL_STACK !== "1") return null;
  return url;
}

export function isMailSinkEnabled(env: Env = settings.mailSinkSettings): boolean {
  return mailSinkUrl(env) !== null;
}

/** Mail every one of whose recipients is a member of the organisation (addresses lower-cased). */
export function addressedOnlyTo(message: Pick<CaughtMessage, "to">, members: ReadonlySet<string>): boolean {
  return message.to.length > 0 && message.to.every((to) => members.has(to.trim().toLowerCase()));
}

export async function fetchCaughtMessages(members: ReadonlySet<string>): Promise<Omit<CaughtMessage, "text" | "html">[]> {
  const base = mailSinkUrl();
  if (!base) return [];
  const res = await fetch(`${base}/messages`, { cache: "no-store" });
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  const items: Omit<CaughtMessage, "text" | "html">[] = (await res.json()).items;
  return items.filter((m) => addressedOnlyTo(m, members));
}

export async function fetchCaughtMessage(id: string, members: ReadonlySet<string>): Promise<CaughtMessage | null> {
  const base = mailSinkUrl();
  if (!base) return null;
  const res = await fetch(`${base}/messages/${encodeURIComponent(id)}`, { cache: "no-store" });
  if (res.status === 404) return null;
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  const message: CaughtMessage = await res.json();
  return addressedOnlyTo(message, members) ? message : null;
}
