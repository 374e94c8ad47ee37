import NextAuth from "next-auth";
import { authOptions } from "@/lib/auth/auth-options";
import { isSignInThrottled, WINDOW_MINUTES } from "@/lib/auth/sign-in-throttle";

const handler = NextAuth(authOptions);

type Ctx = { params: Promise<{ nextauth: string[] }> };

export const GET = handler;

// Credentials sign-in is throttled per e-mail before next-auth sees it, so the answer can be a real 429.
export async function POST(req: Request, ctx: Ctx) {
  if (new URL(req.url).pathname.endsWith("/callback/credentials")) {
    const body = new URLSearchParams(await req.clone().text());
    const email = (body.get("email") ?? "").trim().toLowerCase();
    if (email && (await isSignInThrottled(email))) {
      const origin = new URL(req.url).origin;
      return Response.json(
        {
          error: "too_many_attempts",
          message: `Too many failed sign-ins for this e-mail. Wait ${WINDOW_MINUTES} minutes and try again.`,
          url: `${origin}/sign-in?error=too_many_attempts`,
        },
        { status: 429, headers: { "Retry-After": String(WINDOW_MINUTES * 60) } },
      );
    }
  }
  return handler(req, ctx);
}
