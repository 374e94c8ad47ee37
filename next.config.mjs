import { API_CSP, SECURITY_HEADERS } from "./lib/http/security-headers.mjs";

/** @type {import('next').NextConfig} */
const nextConfig = {
  // A separate folder lets several dev sandboxes run side by side (scripts/stack.mjs sandbox).
  distDir: process.env.NEXT_DIST_DIR ?? ".next",
  // The container image serves the standalone output (docker/Dockerfile sets this); `npm start` uses `next start`.
  output: process.env.HALFTRIP_STANDALONE === "1" ? "standalone" : undefined,
  serverExternalPackages: ["sequelize", "pg", "pg-hstore", "bcryptjs", "nodemailer", "smtp-server", "mailparser"],
  poweredByHeader: false,
  // Tests and sandboxes address the dev server as 127.0.0.1.
  allowedDevOrigins: ["127.0.0.1", "localhost"],
  // `npm run typecheck` (run first by `npm test`) checks the whole project; the build need not repeat it.
  typescript: { ignoreBuildErrors: true },
  // Pages get their Content-Security-Policy (with a nonce) from proxy.ts; two policies would both apply.
  async headers() {
    return [
      { source: "/:path*", headers: SECURITY_HEADERS },
      { source: "/api/:path*", headers: [{ key: "Content-Security-Policy", value: API_CSP }] },
    ];
  },
};

export default nextConfig;
