import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  distDir: process.env.NEXT_DIST_DIR ?? ".next",
  poweredByHeader: false,
  serverExternalPackages: ["pg", "pg-boss", "pg-copy-streams", "@react-pdf/renderer", "bcryptjs", "busboy"],
  typedRoutes: false,
  experimental: { authInterrupts: true },
};

export default nextConfig;
