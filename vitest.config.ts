import path from "node:path";
import { defineConfig } from "vitest/config";

// "server-only" throws outside a React server bundle; tests import server code directly.
const alias = {
  "@": path.resolve(import.meta.dirname),
  "server-only": path.resolve(import.meta.dirname, "tests/support/server-only.ts"),
};

export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      { resolve: { alias }, test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" } },
      {
        resolve: { alias },
        test: { name: "reference", include: ["tests/reference/**/*.test.ts"], environment: "node" },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/support/global-setup.ts"],
          setupFiles: ["tests/support/integration-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          pool: "forks",
          // After the fast projects; two test files at a time (two cores), each with its own database copy.
          sequence: { groupOrder: 1 },
          maxWorkers: 2,
        },
      },
    ],
  },
});
