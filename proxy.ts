import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";

// Cheap first gate (no database): signed-out page requests go to sign-in. Route handlers and pages still
// check the session and role themselves through requirePermission/requirePageUser.
const PUBLIC_PREFIXES = ["/sign-in", "/invite/", "/ack/", "/_next/", "/favicon", "/wordmark", "/manifest.webmanifest", "/icons/"];

export async function proxy(req: NextRequest) {
  const { pathname, search } = req.nextUrl;
  if (PUBLIC_PREFIXES.some((p) => pathname.startsWith(p))) return NextResponse.next();
  const token = await getToken({ req, secret: process.env.AUTH_SECRET ?? process.env.NEXTAUTH_SECRET });
  if (token) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/sign-in";
  url.search = pathname === "/" ? "" : `?callbackUrl=${encodeURIComponent(pathname + search)}`;
  return NextResponse.redirect(url);
}

// Route handlers check their own session or device key; keeping them out of the proxy saves a hop on the ingest path.
export const config = { matcher: ["/((?!api/|_next/static|_next/image|.*\\.svg$).*)"] };
