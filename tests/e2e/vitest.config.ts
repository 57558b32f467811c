import path from "node:path";
import { defineConfig } from "vitest/config";

const root = path.resolve(import.meta.dirname, "../..");

// The browser suite: a production build served by `db/http-server.ts` (as `npm start` does) on demo data, driven by
// playwright-core in Debian's Chromium. Files run one at a time against the one server.
export default defineConfig({
  root,
  resolve: { alias: { "@": root, "server-only": path.join(root, "tests/support/server-only.ts") } },
  test: {
    name: "e2e",
    include: ["tests/e2e/**/*.e2e.ts"],
    globalSetup: ["tests/e2e/global-setup.ts"],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    fileParallelism: false,
    pool: "forks",
  },
});
