import fs from "node:fs";
import path from "node:path";
import { PGlite } from "@electric-sql/pglite";
import { drizzle as drizzlePglite } from "drizzle-orm/pglite";
import { migrate as migratePglite } from "drizzle-orm/pglite/migrator";
import { drizzle as drizzlePg } from "drizzle-orm/node-postgres";
import { migrate as migratePg } from "drizzle-orm/node-postgres/migrator";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import pg from "pg";
import { sql } from "drizzle-orm";
import { dataDir, getEnv } from "@/features/shared/env";
import { acquireLock, releaseLock } from "./lock";
import * as schema from "./schema";
import { pgliteOptions } from "./pglite-options";

export type Db = PgDatabase<PgQueryResultHKT, typeof schema>;
export type DbKind = "pglite" | "postgres";

interface Handle {
  db: Db;
  kind: DbKind;
  close: () => Promise<void>;
  /** Writes the embedded database's data directory as a tarball to a file (pglite only). */
  dumpDataDir?: (file: string) => Promise<void>;
}

// One instance per process, kept on globalThis so hot reloads and duplicated module graphs share it.
const store = globalThis as unknown as { __tankloreDb?: Promise<Handle> };

const migrationsFolder = () => path.resolve(process.cwd(), "drizzle");

/**
 * Connections the app opens to the embedded database process. Its one backend runs one statement at a time (and
 * holds a connection's whole transaction), so more would only queue there instead of here; a few let the next
 * statement be on the wire when the backend frees.
 */
export const EMBEDDED_POOL_SIZE = 4;
/** Any 64-bit key the app uses for nothing else: the migration lock. */
const MIGRATION_LOCK_KEY = 7_160_500_113;

/**
 * Applies pending migrations while holding a PostgreSQL advisory lock, so processes started together apply them
 * once: the second waits, then finds nothing left to do.
 */
async function migrateUnderLock(pool: pg.Pool): Promise<void> {
  const client = await pool.connect();
  try {
    await client.query("select pg_advisory_lock($1)", [MIGRATION_LOCK_KEY]);
    try {
      await migratePg(drizzlePg({ client, schema, casing: "snake_case" }), { migrationsFolder: migrationsFolder() });
    } finally {
      await client.query("select pg_advisory_unlock($1)", [MIGRATION_LOCK_KEY]);
    }
  } finally {
    client.release();
  }
}

async function open(): Promise<Handle> {
  const env = getEnv();
  // A PostgreSQL server, or the embedded database's own process (db/database-process.ts): one code path.
  const url = env.DATABASE_URL ?? env.TANKLORE_EMBEDDED_DB_URL;
  if (url) {
    const kind: DbKind = env.DATABASE_URL ? "postgres" : "pglite";
    const pool = new pg.Pool({ connectionString: url, max: kind === "postgres" ? 10 : EMBEDDED_POOL_SIZE });
    // An idle connection dropped by the server must not crash the app; the next query reconnects.
    pool.on("error", (err) => console.error("Database connection lost:", err.message));
    try {
      // `npm start` migrates before the app serves; anything else opening the database (a script, `next dev`)
      // migrates here, under the same lock.
      if (env.TANKLORE_MIGRATIONS !== "applied") await migrateUnderLock(pool);
    } catch (err) {
      await pool.end();
      throw err;
    }
    const db = drizzlePg({ client: pool, schema, casing: "snake_case" });
    const control = env.TANKLORE_EMBEDDED_DB_CONTROL;
    return {
      db: db as unknown as Db,
      kind,
      close: () => pool.end(),
      dumpDataDir: control ? (file) => requestDump(control, file) : undefined,
    };
  }
  const dir = path.join(dataDir(), "pgdata");
  fs.mkdirSync(dir, { recursive: true });
  const lock = acquireLock(dir);
  try {
    const client = await PGlite.create(dir, pgliteOptions());
    const db = drizzlePglite({ client, schema, casing: "snake_case" });
    await migratePglite(db, { migrationsFolder: migrationsFolder() });
    return {
      db: db as unknown as Db,
      kind: "pglite",
      close: async () => {
        await client.close();
        releaseLock(lock);
      },
      dumpDataDir: async (file) => {
        const tarball = await client.dumpDataDir("none");
        await fs.promises.writeFile(file, Buffer.from(await tarball.arrayBuffer()));
      },
    };
  } catch (err) {
    releaseLock(lock);
    throw err;
  }
}

async function requestDump(control: string, file: string): Promise<void> {
  const res = await fetch(`${control}/dump`, { method: "POST", body: JSON.stringify({ file }) });
  if (!res.ok) throw new Error(`The embedded database could not write its dump: ${await res.text()}`);
}

/**
 * Writes the embedded database's data directory (PGlite's dumpDataDir) to `file`, which must lie inside DATA_DIR.
 * Call it inside a transaction that holds the connection (a backup's snapshot), so no change lands meanwhile.
 */
export async function dumpEmbeddedDataDir(file: string): Promise<void> {
  const h = await handle();
  if (!h.dumpDataDir) throw new Error("Only the embedded database can be dumped as a data directory.");
  await h.dumpDataDir(file);
}

/**
 * CHECKPOINT (the embedded database has no background checkpointer, so after large writes its write-ahead log
 * would only grow). On a PostgreSQL server the server's own checkpointer does this: nothing to do.
 */
export async function checkpointEmbedded(): Promise<void> {
  const h = await handle();
  if (h.kind !== "pglite") return;
  await h.db.execute(sql`checkpoint`);
}

/** The database, opened (and migrated) on first use — never at import time or during `next build`. */
export async function getDb(): Promise<Db> {
  return (await handle()).db;
}

export async function getDbKind(): Promise<DbKind> {
  return (await handle()).kind;
}

function handle(): Promise<Handle> {
  if (process.env.NEXT_PHASE === "phase-production-build") {
    // Build workers run in parallel with nothing owning the data directory: never open it there.
    throw new Error("The database is not available during `next build`; this code must run per request.");
  }
  if (!store.__tankloreDb) {
    store.__tankloreDb = open().catch((err) => {
      store.__tankloreDb = undefined;
      throw err;
    });
  }
  return store.__tankloreDb;
}

/** Closes the database and releases the lock (scripts and tests). */
export async function closeDb(): Promise<void> {
  const h = store.__tankloreDb;
  store.__tankloreDb = undefined;
  if (h) await (await h).close();
}

export { schema };
