import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // mysql2 and friends stay as plain Node requires on the server.
  serverExternalPackages: ["mysql2", "ioredis", "nodemailer"],
};

export default nextConfig;
