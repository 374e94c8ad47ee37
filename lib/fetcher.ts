// SWR fetcher for our route handlers: throws the API's own message so error states can show it.
export class ApiError extends Error {
  constructor(readonly status: number, readonly code: string, message: string, readonly fields?: Record<string, string>) {
    super(message);
  }
}

export async function fetchJson<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, { ...init, headers: { "content-type": "application/json", ...(init?.headers ?? {}) } });
  const body = await res.json().catch(() => null);
  if (!res.ok) {
    throw new ApiError(res.status, body?.error ?? "error", body?.message ?? `The server answered ${res.status}.`, body?.fields);
  }
  return body as T;
}

export const swrFetcher = <T,>(url: string) => fetchJson<T>(url);
