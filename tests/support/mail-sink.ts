// Reads the local SMTP sink that `npm test` starts (MAIL_SINK_URL).
const SINK = process.env.MAIL_SINK_URL ?? "http://127.0.0.1:2581";

export interface SinkMessage {
  id: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  received_at: string;
}

export async function waitForMail(to: string, match: (m: SinkMessage) => boolean = () => true, timeoutMs = 15000): Promise<SinkMessage> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const list = await (await fetch(`${SINK}/messages?to=${encodeURIComponent(to)}`)).json();
    for (const summary of list.items as SinkMessage[]) {
      const full: SinkMessage = await (await fetch(`${SINK}/messages/${summary.id}`)).json();
      if (match(full)) return full;
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
}

export function firstLink(text: string, pathPart: string): string {
  const m = text.match(new RegExp(`https?://\\S*${pathPart}\\S*`));
  if (!m) throw new Error(`no ${pathPart} link in mail`);
  return m[0];
}

/** Every message the sink holds for an address (summaries: no text). */
export async function listMail(to: string): Promise<Omit<SinkMessage, "text">[]> {
  return (await (await fetch(`${SINK}/messages?to=${encodeURIComponent(to)}`)).json()).items;
}

/** Has the sink answer the next `count` deliveries to `to` with a temporary failure (451), as a relay down for a while. */
export async function refuseMail(to: string, count: number): Promise<void> {
  const res = await fetch(`${SINK}/refuse?to=${encodeURIComponent(to)}&count=${count}`, { method: "POST" });
  if (!res.ok) throw new Error(`sink refuse: ${res.status}`);
}
