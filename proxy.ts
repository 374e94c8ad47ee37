import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { authSecret } from "./lib/auth/auth-config";
import { pageCsp } from "./lib/http/security-headers.mjs";

// Cheap first gate (no database): signed-out page requests go to sign-in. Route handlers and pages still
// check the session and role themselves through requirePermission/requirePageUser.
const PUBLIC_PREFIXES = ["/sign-in", "/invite/", "/ack/", "/_next/", "/favicon", "/wordmark", "/manifest.webmanifest", "/icons/"];

// Each page answer gets a fresh nonce in its Content-Security-Policy; Next.js reads it from the request
// header and puts it on its own scripts (so every page renders dynamically: see app/layout.tsx).
function withPagePolicy(req: NextRequest): NextResponse {
  const nonce = Buffer.from(crypto.randomUUID()).toString("base64");
  const policy = pageCsp(nonce, process.env.NODE_ENV !== "production");
  const headers = new Headers(req.headers);
  headers.set("content-security-policy", policy);
  const res = NextResponse.next({ request: { headers } });
  res.headers.set("content-security-policy", policy);
  return res;
}

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  if (PUBLIC_PREFIXES.some((p) => pathname.startsWith(p))) return withPagePolicy(req);
  const token = await getToken({ req, secret: authSecret() });
  if (token) return withPagePolicy(req);
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = pathname === "/" ? "" : `?callbackUrl=${encodeURIComponent(pathname + search)}`;
  return NextResponse.redirect(url);
}

// Route handlers check their own session or device key; keeping them out of the proxy saves a hop on the ingest path.
export const config = { matcher: ["/((?!api/|_next/static|_next/image|.*\\.svg$).*)"] };
