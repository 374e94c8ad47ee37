// Response headers every answer carries (next.config.mjs), and the Content-Security-Policy of pages,
// which proxy.ts sets with a fresh nonce per request so that only Next's own scripts run.
// Plain JavaScript because next.config.mjs loads it before any TypeScript is compiled.

/** @type {{ key: string; value: string }[]} */
export const SECURITY_HEADERS = [
  { key: "X-Frame-Options", value: "DENY" },
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=()" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
];

/** JSON and CSV answers run nothing and are framed by nobody. */
export const API_CSP = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";

/**
 * Pages: scripts only with this request's nonce (and what they load, 'strict-dynamic'); styles may be
 * inline because React and the charts set style attributes; nothing may frame a page.
 * @param {string} nonce
 * @param {boolean} dev `next dev` needs eval for its refresh runtime and a websocket for hot reload
 */
export function pageCsp(nonce, dev) {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src 'self'${dev ? " ws: wss:" : ""}`,
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}
