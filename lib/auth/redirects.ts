// Where sign-in may send the browser afterwards: only a path on our own origin. The value is parsed as a
// URL against the origin, as the browser would ("/\evil.example" and "/\t/evil.example" both leave it),
// and only its path, query and fragment are kept, never starting with "//".
const PLACEHOLDER_ORIGIN = "http://halftrip.invalid";

export function sameOriginPath(target: string | null | undefined, origin: string = PLACEHOLDER_ORIGIN): string {
  if (!target) return "/";
  let url: URL;
  try {
    url = new URL(target, origin);
  } catch {
    return "/";
  }
  if (url.origin !== new URL(origin).origin) return "/";
  return `${url.pathname.replace(/^\/+/, "/")}${url.search}${url.hash}`;
}

/** next-auth's redirect callback: an absolute URL on our origin, else the origin itself. */
export function sameOriginRedirect(url: string, baseUrl: string): string {
  return new URL(sameOriginPath(url, baseUrl), baseUrl).href;
}
