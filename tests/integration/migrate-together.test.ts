import { spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// `npm run db:migrate` started three times at once on one empty PostgreSQL database: the advisory lock lets one
// apply the migrations while the others wait, then find nothing left to do. (The same lock guards `npm start`;
// tests/e2e/migrations-together.e2e.ts starts two whole servers.)
let stop: (() => void) | undefined;
afterAll(() => stop?.());

function migrate(env: NodeJS.ProcessEnv): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "db/migrate.ts"], {
      cwd: process.cwd(),
      env,
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    child.on("exit", (code) => resolve({ code, out }));
  });
}

describe.skipIf(!hasPostgresServer())("migrations started together", () => {
  it("apply once when three db:migrate processes start at the same moment", { timeout: 300_000 }, async () => {
    const server = await startPostgres();
    stop = server.stop;
    const env = {
      ...process.env,
      DATABASE_URL: server.url,
      BETTER_AUTH_SECRET: "together-secret-together-secret-0123456",
      BETTER_AUTH_URL: "http://localhost:3000",
    };
    const runs = await Promise.all([migrate(env), migrate(env), migrate(env)]);
    for (const r of runs) expect(r, r.out).toMatchObject({ code: 0 });
    const journal = JSON.parse(
      fs.readFileSync(path.join(process.cwd(), "drizzle", "meta", "_journal.json"), "utf8"),
    ) as { entries: unknown[] };
    const client = new pg.Client({ connectionString: server.url });
    await client.connect();
    try {
      const { rows } = await client.query<{ n: number; d: number }>(
        "select count(*)::int as n, count(distinct hash)::int as d from drizzle.__drizzle_migrations",
      );
      expect(rows[0]).toEqual({ n: journal.entries.length, d: journal.entries.length });
    } finally {
      await client.end();
    }
  });
});
