import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import type { ReadableStream as NodeReadableStream } from "node:stream/web";
import { pipeline } from "node:stream/promises";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql, type SQL } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as backupRoute from "@/app/api/admin/backup/route";
import * as reportsRoute from "@/app/api/reports/route";
import { closeDb, getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { restoreBackup } from "@/features/exchange/server";
import { BASE, call } from "../support/http";
import { reportBody, signIn } from "../support/factories";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// The same backup and restore on a PostgreSQL server: pg_dump reads the backup transaction's snapshot
// while members keep writing, and pg_restore fills an empty database.
describe("backup and restore on a PostgreSQL server", () => {
  let stop: () => void = () => {};
  let url = "";
  const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-pg-backup-"));

  beforeAll(async () => {
    if (!hasPostgresServer()) throw new Error("initdb and pg_ctl are needed on PATH (apt-get install -y postgresql).");
    const server = await startPostgres();
    stop = server.stop;
    url = server.url;
    process.env.DATABASE_URL = url;
    await seedDemo(await getDb(), { password: "pg-backup-password" });
  });

  afterAll(async () => {
    await closeDb();
    delete process.env.DATABASE_URL;
    stop();
    fs.rmSync(scratch, { recursive: true, force: true });
  });

  const tables = [
    "select * from reports order by id",
    "select * from report_events order by id",
    "select * from evidence_summaries order by group_slug, agent_slug, condition_slug",
    "select * from club_settings",
  ];
  const rowsOf = async (db: { execute: (q: SQL) => Promise<unknown> }, q: string) =>
    ((await db.execute(sql.raw(q))) as { rows: unknown[] }).rows;

  it("dumps a consistent snapshot while reports are filed, and restores it into an empty database", async () => {
    const admin = await signIn("admin@example.org", "pg-backup-password");
    const member = await signIn("member@example.org", "pg-backup-password");
    const db = await getDb();
    const before = await Promise.all(tables.map((q) => rowsOf(db, q)));

    const writes = Array.from({ length: 6 }, (_, i) =>
      new Promise((r) => setTimeout(r, i * 30)).then(() =>
        call(reportsRoute.POST, "/api/reports", { body: reportBody({ submit: true }), cookie: member }),
      ),
    );
    const res = await backupRoute.GET(new Request(`${BASE}/api/admin/backup`, { headers: { cookie: admin } }), {
      params: Promise.resolve({}),
    });
    expect(res.status).toBe(200);
    const file = path.join(scratch, "pg.tar.gz");
    await pipeline(Readable.fromWeb(res.body as NodeReadableStream), fs.createWriteStream(file));
    expect((await Promise.all(writes)).map((r) => r.status)).toEqual(Array(6).fill(201));

    const admin2 = new pg.Client({ connectionString: url });
    await admin2.connect();
    await admin2.query("create database restored");
    await admin2.end();
    const restoredUrl = url.replace(/\/postgres$/, "/restored");

    const target = path.join(scratch, "data");
    const result = await restoreBackup(file, {
      dataDir: target,
      databaseUrl: restoredUrl,
      authSecretEnv: process.env.BETTER_AUTH_SECRET,
    });
    expect(result.manifest.database).toEqual({ kind: "postgres", file: "database/tanklore.pgdump" });
    expect(result.counts.reports).toBeGreaterThanOrEqual(before[0]!.length);
    expect(result.counts.reports).toBeLessThanOrEqual(before[0]!.length + 6);

    const pool = new pg.Pool({ connectionString: restoredUrl, max: 1 });
    try {
      const restored = drizzle({ client: pool, schema, casing: "snake_case" });
      // Reports present before the backup started are all there, byte for byte; new ones are whole or absent.
      const restoredReports = (await rowsOf(restored, tables[0]!)) as { id: string }[];
      const ids = new Set(restoredReports.map((r) => r.id));
      for (const r of before[0] as { id: string }[]) expect(ids.has(r.id)).toBe(true);
      const live = new Map(((await rowsOf(db, tables[0]!)) as { id: string }[]).map((r) => [r.id, r]));
      for (const r of restoredReports) expect(r).toEqual(live.get(r.id));
      const orphans = await rowsOf(
        restored,
        "select r.id from reports r where not exists (select 1 from report_events e where e.report_id = r.id)",
      );
      expect(orphans).toEqual([]);
      expect(await rowsOf(restored, tables[2]!)).toEqual(before[2]);
      expect(await rowsOf(restored, tables[3]!)).toEqual(before[3]);
    } finally {
      await pool.end();
    }

    // The club's own database is not empty: a restore into it is refused.
    await expect(restoreBackup(file, { dataDir: path.join(scratch, "other"), databaseUrl: url })).rejects.toThrow(
      /database at DATABASE_URL is not empty/,
    );
  }, 300_000);
});
