import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // These packages load WebAssembly, native binaries or open sockets at run time, or (tar-stream) name a
  // Bare-runtime module that bundlers would try to resolve: they must stay plain Node.js modules rather than be bundled.
  serverExternalPackages: ["@electric-sql/pglite", "sharp", "smtp-server", "nodemailer", "mailparser", "pg", "tar-stream"],
  poweredByHeader: false,
  typedRoutes: false,
  // The app is served from this checkout; keep the build inside it.
  turbopack: { root: import.meta.dirname },
  // forbidden() and unauthorized() from next/navigation: data functions refuse a caller, pages answer 403/401.
  experimental: { authInterrupts: true },
};

export default nextConfig;
