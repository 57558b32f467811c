import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { freePort } from "../support/free-port";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// Two `npm start` processes (db/start.ts, on the build global-setup made) launched at the same moment against one
// empty PostgreSQL database: the advisory lock lets one apply the migrations while the other waits.
const root = process.cwd();
const children: ChildProcess[] = [];
let stopPg: (() => void) | undefined;

afterAll(async () => {
  for (const c of children) {
    const exited = new Promise((r) => c.once("exit", r));
    c.kill("SIGTERM");
    await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
    if (c.exitCode === null) c.kill("SIGKILL");
  }
  stopPg?.();
});

async function healthy(url: string, log: () => string): Promise<unknown> {
  for (let i = 0; i < 360; i++) {
    const res = await fetch(`${url}/api/health`).catch(() => null);
    if (res?.ok) return res.json();
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`${url} never became healthy:\n${log()}`);
}

describe.skipIf(!hasPostgresServer())("processes started together on an empty PostgreSQL database", () => {
  it("both come up, with every migration applied exactly once", { timeout: 300_000 }, async () => {
    const server = await startPostgres();
    stopPg = server.stop;
    const ports = [await freePort(), await freePort()];
    const logs = ["", ""];
    ports.forEach((port, k) => {
      const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-together-"));
      const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "db/start.ts"], {
        cwd: root,
        env: {
          ...process.env,
          TEST: "",
          DATA_DIR: dataDir,
          PORT: String(port),
          DATABASE_URL: server.url,
          BETTER_AUTH_SECRET: "together-secret-together-secret-0123456",
          BETTER_AUTH_URL: `http://localhost:${port}`,
        },
        stdio: ["ignore", "pipe", "pipe"],
      });
      child.stdout?.on("data", (d) => (logs[k] += d));
      child.stderr?.on("data", (d) => (logs[k] += d));
      children.push(child);
    });
    const answers = await Promise.all(ports.map((p, k) => healthy(`http://localhost:${p}`, () => logs[k]!)));
    expect(answers).toEqual([
      { status: "ok", database: "postgres" },
      { status: "ok", database: "postgres" },
    ]);

    const journal = JSON.parse(fs.readFileSync(path.join(root, "drizzle", "meta", "_journal.json"), "utf8")) as {
      entries: { tag: string }[];
    };
    const client = new pg.Client({ connectionString: server.url });
    await client.connect();
    try {
      const applied = await client.query<{ hash: string }>("select hash from drizzle.__drizzle_migrations");
      expect(applied.rows.length).toBe(journal.entries.length);
      expect(new Set(applied.rows.map((r) => r.hash)).size).toBe(journal.entries.length);
    } finally {
      await client.end();
    }
  });

  it(
    "refuses to start with DATABASE_URL but no BETTER_AUTH_SECRET or BETTER_AUTH_URL, naming both",
    { timeout: 120_000 },
    async () => {
      const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: "postgres://nobody@127.0.0.1:1/none" };
      delete env.BETTER_AUTH_SECRET;
      delete env.BETTER_AUTH_URL;
      const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "db/start.ts"], {
        cwd: root,
        env,
        stdio: ["ignore", "pipe", "pipe"],
      });
      let out = "";
      child.stdout?.on("data", (d) => (out += d));
      child.stderr?.on("data", (d) => (out += d));
      const code = await new Promise<number | null>((r) => child.once("exit", r));
      expect(code).toBe(1);
      expect(out).toMatch(/BETTER_AUTH_SECRET is required when DATABASE_URL is set/);
      expect(out).toMatch(/BETTER_AUTH_URL is required when DATABASE_URL is set/);
    },
  );
});
