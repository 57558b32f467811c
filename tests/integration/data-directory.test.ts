import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";

// One process (not the tsx wrapper, which forks): kill -9 must hit the process that writes.
const node = process.execPath;
const tsxArgs = ["--import", "tsx"];
const child = path.resolve("tests/support/child-db.ts");
// PGlite and node-postgres results both carry `rows`.
const rowsOf = (r: unknown) => (r as { rows: Record<string, unknown>[] }).rows;

describe("the embedded database's data directory", () => {
  it("refuses a second process with a message naming the holder, and leaves the files alone", async () => {
    const db = await getDb(); // this test process now holds DATA_DIR
    await db.execute(sql`create table lock_probe (n int)`);
    await db.execute(sql`insert into lock_probe values (1), (2)`);
    const before = fs.readdirSync(path.join(process.env.DATA_DIR!, "pgdata")).sort();

    const r = spawnSync(node, [...tsxArgs, child, "open"], { env: process.env, encoding: "utf8", timeout: 60_000 });
    expect(r.status).toBe(3);
    expect(r.stderr).toContain(`in use by another Tanklore process (pid ${process.pid}`);
    expect(r.stderr).toContain("give this one its own DATA_DIR");

    expect(fs.readdirSync(path.join(process.env.DATA_DIR!, "pgdata")).sort()).toEqual(before);
    const rows = await db.execute(sql`select count(*)::int as n from lock_probe`);
    expect(rowsOf(rows)[0]).toEqual({ n: 2 });
  });

  it("keeps every acknowledged row after kill -9 of its only writer, and takes over the stale lock", async () => {
    await closeDb();
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-kill-"));
    fs.cpSync(path.join(process.env.DATA_DIR!, "pgdata"), path.join(dir, "pgdata"), { recursive: true });
    fs.rmSync(path.join(dir, "pgdata.lock"), { force: true });
    const proc = spawn(node, [...tsxArgs, child, "write"], { env: { ...process.env, DATA_DIR: dir } });
    let acked = 0;
    let stderr = "";
    proc.stderr.on("data", (d) => (stderr += d));
    await new Promise<void>((resolve, reject) => {
      proc.stdout.on("data", (d: Buffer) => {
        for (const m of d.toString().matchAll(/ack (\d+)/g)) acked = Number(m[1]);
        if (acked >= 40) {
          proc.kill("SIGKILL");
          resolve();
        }
      });
      proc.on("exit", () => (acked >= 40 ? resolve() : reject(new Error(`writer exited early: ${stderr}`))));
    });
    await new Promise((r) => proc.once("close", r));
    expect(fs.existsSync(path.join(dir, "pgdata.lock"))).toBe(true); // left behind by the killed process

    const previous = process.env.DATA_DIR;
    process.env.DATA_DIR = dir;
    try {
      const db = await getDb();
      const rows = await db.execute(sql`select count(*)::int as n, max(n)::int as top from durability_probe`);
      const { n, top } = rowsOf(rows)[0] as { n: number; top: number };
      expect(top).toBeGreaterThanOrEqual(acked);
      expect(n).toBe(top); // no gaps: every row up to the last acknowledged one is there
    } finally {
      await closeDb();
      process.env.DATA_DIR = previous;
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("applies every migration to a fresh directory", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-fresh-"));
    const r = spawnSync(node, [...tsxArgs, "db/migrate.ts"], {
      env: { ...process.env, DATA_DIR: dir },
      encoding: "utf8",
      timeout: 90_000,
    });
    expect(r.stderr).toBe("");
    expect(r.stdout).toContain("Migrations applied (pglite)");
    const previous = process.env.DATA_DIR;
    process.env.DATA_DIR = dir;
    try {
      const db = await getDb();
      const tables = await db.execute(
        sql`select table_name from information_schema.tables where table_schema = 'public' order by 1`,
      );
      const names = rowsOf(tables).map((t) => t.table_name);
      for (const t of [
        "users",
        "sessions",
        "accounts",
        "verifications",
        "club_settings",
        "species_groups",
        "species",
        "agents",
        "stock_forms",
        "conditions",
        "reports",
        "report_events",
        "photos",
        "role_changes",
      ]) {
        expect(names).toContain(t);
      }
      const applied = await db.execute(sql`select count(*)::int as n from drizzle.__drizzle_migrations`);
      const journal = JSON.parse(fs.readFileSync("drizzle/meta/_journal.json", "utf8"));
      expect(rowsOf(applied)[0]).toEqual({ n: journal.entries.length });
    } finally {
      await closeDb();
      process.env.DATA_DIR = previous;
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
