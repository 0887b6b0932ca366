import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // better-sqlite3 is a native addon: load it from node_modules at run time, never bundle it.
  // kysely and pg too: bundled, each route's chunk got its own copy of Kysely, while the database
  // instance is shared through globalThis (db/index.ts); `adapter instanceof PostgresAdapter` then
  // failed in every chunk but the one that made it, and the PostgreSQL row and advisory locks were
  // silently skipped (found by tests/integration/postgres-servers.test.ts: 14 password checks in a
  // sign-in burst, not 10). Loaded from node_modules there is one Kysely per process.
  serverExternalPackages: ["better-sqlite3", "kysely", "pg"],
  poweredByHeader: false,
  typedRoutes: false,
  async headers() {
    const everywhere = [
      { key: "X-Content-Type-Options", value: "nosniff" },
      { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
      { key: "X-Frame-Options", value: "DENY" },
      { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=()" },
    ];
    return [
      { source: "/:path*", headers: everywhere },
      // HSTS only when the request came over https (behind a proxy that says so).
      {
        source: "/:path*",
        has: [{ type: "header", key: "x-forwarded-proto", value: "https" }],
        headers: [{ key: "Strict-Transport-Security", value: "max-age=31536000; includeSubDomains" }],
      },
    ];
  },
};

export default nextConfig;
