import fs from "node:fs";
import path from "node:path";
import { sql } from "drizzle-orm";
import { dataDir, getEnv } from "@/features/shared/env";
import { DataDirLockedError } from "./lock";

// `npm run db:compact`: VACUUM (returns dead rows' space for reuse), ANALYZE, and CHECKPOINT (writes the WAL out so
// its segments can be recycled), then prints the sizes. Works with the app stopped (it opens DATA_DIR itself) or
// running (it connects to the embedded database's process); with DATABASE_URL it asks that server.

function du(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.size;
  return fs.readdirSync(p).reduce((n, e) => n + du(path.join(p, e)), 0);
}
const mb = (n: number) => `${(n / 1048576).toFixed(1)} MB`;

async function main(): Promise<number> {
  const env = getEnv();
  const pgdata = path.join(dataDir(), "pgdata");
  const address = `${pgdata}.address`;
  if (!env.DATABASE_URL) {
    try {
      // Free: this script takes the data directory (and its lock) for the duration.
      const { acquireLock, releaseLock } = await import("./lock");
      releaseLock(acquireLock(pgdata));
    } catch (err) {
      if (!(err instanceof DataDirLockedError) || !fs.existsSync(address)) throw err;
      // The app is running: talk to its database process like the app does.
      process.env.TANKLORE_EMBEDDED_DB_URL = fs.readFileSync(address, "utf8").trim();
      process.env.TANKLORE_MIGRATIONS = "applied";
    }
  }
  const { closeDb, getDb, getDbKind } = await import("./client");
  const db = await getDb();
  const kind = await getDbKind();
  const size = async () =>
    Number(
      (
        (await db.execute(sql`select pg_database_size(current_database())::bigint as n`)) as unknown as {
          rows: { n: string }[];
        }
      ).rows[0]!.n,
    );
  const before = { dir: du(pgdata), live: await size() };
  console.log("VACUUM (ANALYZE)…");
  await db.execute(sql`vacuum (analyze)`);
  try {
    await db.execute(sql`checkpoint`);
  } catch (err) {
    // A PostgreSQL role may lack the right (pg_checkpoint); that server checkpoints on its own anyway.
    console.warn("CHECKPOINT skipped:", err instanceof Error ? err.message : err);
  }
  // With the app stopped this script holds the data directory: the write-ahead log segments past the current one
  // are left from before the WAL bounds (db/pglite-options.ts) — recycled ahead of time, holding nothing yet — and
  // can go once the database is closed. PostgreSQL makes new ones as it needs them.
  const liveAfter = await size();
  const ownsDir = kind === "pglite" && !process.env.TANKLORE_EMBEDDED_DB_URL;
  const current = ownsDir
    ? (
        (await db.execute(sql`select pg_walfile_name(pg_current_wal_insert_lsn()) as f`)) as unknown as {
          rows: { f: string }[];
        }
      ).rows[0]!.f
    : null;
  await closeDb();
  if (current) {
    const wal = path.join(pgdata, "pg_wal");
    const ahead = fs
      .readdirSync(wal)
      .filter((f) => /^[0-9A-F]{24}$/.test(f) && f > current)
      .sort();
    // Two are kept for the shutdown checkpoint's record and the next start.
    for (const f of ahead.slice(2)) fs.rmSync(path.join(wal, f));
  }
  const after = { dir: du(pgdata), live: liveAfter };
  if (kind === "pglite")
    console.log(
      `Data directory ${mb(before.dir)} → ${mb(after.dir)}; live data (pg_database_size) ${mb(before.live)} → ${mb(after.live)}.`,
    );
  else console.log(`Database size (pg_database_size) ${mb(before.live)} → ${mb(after.live)}.`);
  return 0;
}

try {
  process.exitCode = await main();
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exitCode = 1;
}
