import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // These packages load WebAssembly, native binaries or open sockets at run time, or (tar-stream) name a
  // Bare-runtime module that bundlers would try to resolve: they must stay plain Node.js modules rather than be bundled.
  serverExternalPackages: [
    "@electric-sql/pglite",
    "sharp",
    "smtp-server",
    "nodemailer",
    "mailparser",
    "pg",
    "tar-stream",
  ],
  poweredByHeader: false,
  typedRoutes: false,
  experimental: {
    // With proxy.ts (security headers) Next.js buffers each request body for it and silently cuts one longer
    // than this. Keep it above the largest body any route accepts (the 20 MB CSV import), so a cut body is
    // always one the route's own limit refuses with 413 rather than a truncated file read as whole.
    proxyClientMaxBodySize: "21mb",
    // forbidden() and unauthorized() from next/navigation: data functions refuse a caller, pages answer 403/401.
    authInterrupts: true,
    // The `'use cache'` directive for the public evidence reads (features/evidence/server/queries.ts), without
    // cacheComponents: that would make every page's uncached data and session reads sit under <Suspense> and
    // forbid route segment options such as `dynamic`, app-wide. Deprecated in favour of cacheComponents, still
    // honoured by Next.js 16 (see docs/architecture.md, "Evidence caching").
    useCache: true,
  },
  // The app is served from this checkout; keep the build inside it.
  turbopack: { root: import.meta.dirname },
};

export default nextConfig;
