import { env } from "../env";

// Guards of state-changing requests to the management API against cross-site use. SameSite=Lax cookies
// alone leave "same-site" pages (another port or subdomain) able to post forms with the session, so a
// change must come from our own origin and carry a body type a plain HTML form cannot send.
const STATE_CHANGING = new Set(["POST", "PUT", "PATCH", "DELETE"]);

export function isStateChanging(method: string): boolean {
  return STATE_CHANGING.has(method.toUpperCase());
}

function appOrigin(): string | null {
  const url = env.configuredAppUrl;
  try {
    return url ? new URL(url).origin : null;
  } catch {
    return null;
  }
}

/** Why this request does not come from our own origin, or null when it does. */
export function crossOriginProblem(headers: Headers): string | null {
  const fetchSite = headers.get("sec-fetch-site");
  const origin = headers.get("origin");
  if (fetchSite === null && origin === null) return "Send the request from Halftrip's own pages (no Origin or Sec-Fetch-Site header).";
  if (fetchSite !== null && fetchSite !== "same-origin") return "Cross-site requests may not change anything.";
  if (origin !== null) {
    let host: string;
    try {
      host = new URL(origin).host;
    } catch {
      return "The Origin header is not a URL.";
    }
    if (host !== headers.get("host") && origin !== appOrigin()) return "Cross-origin requests may not change anything.";
  }
  return null;
}

/** The media type of the body without parameters ("application/json"), or null when none is declared. */
export function mediaType(headers: Headers): string | null {
  const value = headers.get("content-type");
  return value === null ? null : value.split(";")[0].trim().toLowerCase();
}

/** A request without Content-Type must not carry a body (an HTML form always declares its type). */
export function hasBody(headers: Headers): boolean {
  const length = headers.get("content-length");
  return headers.has("transfer-encoding") || (length !== null && length !== "0");
}
