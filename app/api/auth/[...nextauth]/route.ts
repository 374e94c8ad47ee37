import NextAuth from "next-auth";
import { NextRequest } from "next/server";
import { authOptions } from "@/lib/auth/auth-options";
import { claimSignInAttempt, clientAddress } from "@/lib/auth/sign-in-throttle";
import { errorResponse, readBodyWithLimit } from "@/lib/http/errors";

const handler = NextAuth(authOptions);

type Ctx = { params: Promise<{ nextauth: string[] }> };

// next-auth's own forms (CSRF token, e-mail, password, callback URL) are a few hundred bytes.
const MAX_AUTH_BODY_BYTES = 8 * 1024;

export const GET = handler;

// Every attempt is counted (per e-mail and per client address) before next-auth checks the password,
// so the answer can be a real 429 and simultaneous attempts cannot slip past the limit together.
export async function POST(req: Request, ctx: Ctx) {
  try {
    const body = await readBodyWithLimit(req, MAX_AUTH_BODY_BYTES);
    if (new URL(req.url).pathname.endsWith("/callback/credentials")) {
      const refusal = await refuseThrottled(req, new URLSearchParams(body).get("email"));
      if (refusal) return refusal;
    }
    return await handler(new NextRequest(req.url, { method: "POST", headers: req.headers, body }), ctx);
  } catch (err) {
    return errorResponse(err);
  }
}

async function refuseThrottled(req: Request, rawEmail: string | null): Promise<Response | null> {
  const email = (rawEmail ?? "").trim().toLowerCase();
  if (!email) return null;
  const claim = await claimSignInAttempt(email, clientAddress(req.headers));
  if (claim.ok) return null;
  const message =
    claim.reason === "account"
      ? `Too many failed sign-ins for this e-mail. Wait ${Math.ceil(claim.retryAfterS / 60)} minutes and try again.`
      : `Too many failed sign-ins from your network. Wait ${claim.retryAfterS} seconds and try again.`;
  return Response.json(
    { error: "too_many_attempts", message, url: `${new URL(req.url).origin}/sign-in?error=too_many_attempts` },
    { status: 429, headers: { "Retry-After": String(claim.retryAfterS) } },
  );
}
