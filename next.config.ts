import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // better-sqlite3 is a native addon, and piscina starts workers from its own files: both load from node_modules at run time.
  serverExternalPackages: ["better-sqlite3", "piscina"],
  poweredByHeader: false,
};

export default nextConfig;
