import type { NextConfig } from "next";
import { API_CSP, STATIC_HEADERS } from "./lib/security-headers";

const nextConfig: NextConfig = {
  reactStrictMode: true,
  // A second checkout of the build (e.g. a parallel test run) can live beside the default one.
  distDir: process.env.SUMFOLD_NEXT_DIST ?? ".next",
  poweredByHeader: false,
  // mysql2 and friends stay as plain Node requires on the server.
  serverExternalPackages: ["mysql2", "ioredis", "nodemailer", "piscina", "bullmq", "stripe", "pdf-lib"],
  // Pages get their nonce-based CSP (and HSTS) from proxy.ts; these apply to every response.
  async headers() {
    return [
      { source: "/:path*", headers: STATIC_HEADERS },
      { source: "/api/:path*", headers: [{ key: "Content-Security-Policy", value: API_CSP }] },
    ];
  },
};

export default nextConfig;
