import path from "node:path";
import { defineConfig } from "vitest/config";

const root = path.resolve(import.meta.dirname, "../..");

// The several-process suite: production builds of the app (built once, in global setup) run as two processes on one
// throwaway PostgreSQL server and the local S3 fake. Files run one at a time (each starts its own cluster).
export default defineConfig({
  root,
  resolve: { alias: { "@": root, "server-only": path.join(root, "tests/support/server-only.ts") } },
  test: {
    name: "cluster",
    include: ["tests/cluster/**/*.test.ts"],
    globalSetup: ["tests/cluster/global-setup.ts"],
    testTimeout: 60_000,
    hookTimeout: 240_000,
    fileParallelism: false,
    pool: "forks",
  },
});
