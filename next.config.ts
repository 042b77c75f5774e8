import type { NextConfig } from "next";
import { baseSecurityHeaders } from "./lib/api/security-headers";

const nextConfig: NextConfig = {
  // better-sqlite3 is a native addon, and piscina starts workers from its own files: both load from node_modules at run time.
  serverExternalPackages: ["better-sqlite3", "piscina"],
  poweredByHeader: false,
  // Built scripts and styles bypass proxy.ts (its matcher); they still must not be sniffed or framed. Pages and /api get
  // the full set at run time (lib/api/security-headers.ts), where NEXTAUTH_URL decides HSTS.
  async headers() {
    return [
      {
        source: "/_next/static/:path*",
        headers: Object.entries(baseSecurityHeaders())
          .filter(([key]) => key !== "strict-transport-security")
          .map(([key, value]) => ({ key, value })),
      },
    ];
  },
};

export default nextConfig;
