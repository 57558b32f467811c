import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, inject } from "vitest";

// Each test file: its own copy of the migrated template, its own mail folder, a fixed secret.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-test-"));
fs.cpSync(path.join(inject("templateDataDir"), "pgdata"), path.join(dir, "pgdata"), { recursive: true });
process.env.DATA_DIR = dir;
process.env.BETTER_AUTH_SECRET = "test-secret-test-secret-test-secret-0123";
process.env.BETTER_AUTH_URL = "http://localhost:3000";
process.env.RATE_LIMIT ??= "off";
delete process.env.DATABASE_URL;
delete process.env.SMTP_URL;

afterAll(async () => {
  const { closeDb } = await import("@/db/client");
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
});
