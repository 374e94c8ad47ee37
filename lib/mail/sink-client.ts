import { env } from "../env";

// Reads what the local SMTP sink caught (development and tests only; absent in production).
export interface CaughtMessage {
  id: string;
  received_at: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

function sinkUrl(): string | null {
  return env.mailSinkUrl;
}

export function isMailSinkConfigured(): boolean {
  return sinkUrl() !== null;
}

export async function fetchCaughtMessages(): Promise<Omit<CaughtMessage, "text" | "html">[]> {
  const base = sinkUrl();
  if (!base) return [];
  const res = await fetch(`${base}/messages`, { cache: "no-store" });
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  return (await res.json()).items;
}

export async function fetchCaughtMessage(id: string): Promise<CaughtMessage | null> {
  const base = sinkUrl();
  if (!base) return null;
  const res = await fetch(`${base}/messages/${encodeURIComponent(id)}`, { cache: "no-store" });
  if (res.status === 404) return null;
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  return res.json();
}
