import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  reactStrictMode: true,
  // A second checkout of the build (e.g. a parallel test run) can live beside the default one.
  distDir: process.env.SUMFOLD_NEXT_DIST ?? ".next",
  poweredByHeader: false,
  // mysql2 and friends stay as plain Node requires on the server.
  serverExternalPackages: ["mysql2", "ioredis", "nodemailer", "piscina", "bullmq", "stripe", "pdf-lib"],
};

export default nextConfig;
