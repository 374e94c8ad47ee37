import { describe, expect, it } from "vitest";
import { sameOriginPath, sameOriginRedirect } from "@/lib/auth/redirects";

// Issue 14, hole 3: /sign-in?callbackUrl=/%5Cevil.example/x (and /%09/…) sent the browser to another
// host. Browsers parse "\" as "/" and drop tabs in URLs (WHATWG URL Standard), so both became "//evil…".
const ORIGIN = "https://halftrip.example";

describe("where sign-in may go afterwards", () => {
  it.each(["/\\evil.example/x", "/\t/evil.example/x", "//evil.example/x", "https://evil.example/x", "/\\/evil.example", "\\\\evil.example", "javascript:alert(1)", "/.//evil.example"])(
    "never leaves the origin for %j",
    (target) => {
      const path = sameOriginPath(target, ORIGIN);
      expect(path.startsWith("/")).toBe(true);
      expect(path.startsWith("//")).toBe(false);
      expect(new URL(path, ORIGIN).origin).toBe(ORIGIN);
    },
  );

  it("keeps a same-origin path with its query and fragment", () => {
    expect(sameOriginPath("/alarms?state=active#top", ORIGIN)).toBe("/alarms?state=active#top");
    expect(sameOriginPath(`${ORIGIN}/sites/1`, ORIGIN)).toBe("/sites/1");
    expect(sameOriginPath(undefined, ORIGIN)).toBe("/");
  });

  it("answers next-auth's redirect callback with an absolute URL on the origin", () => {
    expect(sameOriginRedirect("/\\evil.example/x", ORIGIN)).toBe(`${ORIGIN}/`);
    expect(sameOriginRedirect(`${ORIGIN}/alarms`, ORIGIN)).toBe(`${ORIGIN}/alarms`);
  });
});
