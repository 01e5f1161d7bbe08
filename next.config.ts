import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // `npm test` builds into its own folder so it never disturbs the build `npm start` serves.
  distDir: process.env.SPILLWAY_DIST_DIR || ".next",
  // pg-boss and the database and mail drivers stay plain Node modules on the server.
  serverExternalPackages: ["pg-boss", "pg", "nodemailer", "bcryptjs", "smtp-server", "mailparser", "piscina"],
  poweredByHeader: false,
  experimental: { authInterrupts: true },
};

export default nextConfig;
