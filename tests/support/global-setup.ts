import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";

// A migrated PGlite data directory made once per run; each test file starts from a copy of it,
// which takes milliseconds where a fresh initdb takes seconds.
export default async function setup(project: TestProject) {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-template-"));
  process.env.DATA_DIR = root;
  process.env.BETTER_AUTH_SECRET = "test-secret-test-secret-test-secret-0123";
  const { getDb, closeDb } = await import("@/db/client");
  await getDb();
  await closeDb();
  project.provide("templateDataDir", root);
  return () => fs.rmSync(root, { recursive: true, force: true });
}

declare module "vitest" {
  export interface ProvidedContext {
    templateDataDir: string;
  }
}
