import fs from "node:fs";
import path from "node:path";
import { PGlite } from "@electric-sql/pglite";
import { drizzle as drizzlePglite } from "drizzle-orm/pglite";
import { migrate as migratePglite } from "drizzle-orm/pglite/migrator";
import { drizzle as drizzlePg } from "drizzle-orm/node-postgres";
import { migrate as migratePg } from "drizzle-orm/node-postgres/migrator";
import type { PgDatabase, PgQueryResultHKT } from "drizzle-orm/pg-core";
import pg from "pg";
import { dataDir, getEnv } from "@/features/shared/env";
import { acquireLock, releaseLock } from "./lock";
import * as schema from "./schema";

export type Db = PgDatabase<PgQueryResultHKT, typeof schema>;
export type DbKind = "pglite" | "postgres";

interface Handle {
  db: Db;
  kind: DbKind;
  close: () => Promise<void>;
}

// One instance per process, kept on globalThis so hot reloads and duplicated module graphs share it.
const store = globalThis as unknown as { __tankloreDb?: Promise<Handle> };

const migrationsFolder = () => path.resolve(process.cwd(), "drizzle");

async function open(): Promise<Handle> {
  const env = getEnv();
  if (env.DATABASE_URL) {
    const pool = new pg.Pool({ connectionString: env.DATABASE_URL, max: 10 });
    const db = drizzlePg({ client: pool, schema, casing: "snake_case" });
    await migratePg(db, { migrationsFolder: migrationsFolder() });
    return { db: db as unknown as Db, kind: "postgres", close: () => pool.end() };
  }
  const dir = path.join(dataDir(), "pgdata");
  fs.mkdirSync(dir, { recursive: true });
  const lock = acquireLock(dir);
  try {
    const client = await PGlite.create(dir);
    const db = drizzlePglite({ client, schema, casing: "snake_case" });
    await migratePglite(db, { migrationsFolder: migrationsFolder() });
    return {
      db: db as unknown as Db,
      kind: "pglite",
      close: async () => {
        await client.close();
        releaseLock(lock);
      },
    };
  } catch (err) {
    releaseLock(lock);
    throw err;
  }
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
