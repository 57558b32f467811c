import "server-only";
import crypto from "node:crypto";
import { execFile } from "node:child_process";
import fs from "node:fs";
import fsp from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import { promisify } from "node:util";
import zlib from "node:zlib";
import { PGlite } from "@electric-sql/pglite";
import { drizzle as drizzlePglite } from "drizzle-orm/pglite";
import { drizzle as drizzlePg } from "drizzle-orm/node-postgres";
import pg from "pg";
import tar from "tar-stream";
import { schema, type Db } from "@/db/client";
import { acquireLock, releaseLock } from "@/db/lock";
import {
  archivePaths,
  BACKUP_FORMAT,
  BACKUP_FORMAT_VERSION,
  countClub,
  pgToolConnection,
  secretFingerprint,
  type BackupCounts,
  type BackupManifest,
} from "./backup";
import { objectStorage } from "@/features/shared/server/object-storage";
import { pgliteOptions } from "@/db/pglite-options";

const run = promisify(execFile);

/** A restore that cannot go ahead; its message says what to do, and nothing was changed. */
export class RestoreRefusedError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "RestoreRefusedError";
  }
}

export interface RestoreTarget {
  /** The data directory to fill: photos and the secret always land here, the database too without a URL. */
  dataDir: string;
  /** An empty PostgreSQL database to restore a server backup into. */
  databaseUrl?: string;
  /** BETTER_AUTH_SECRET of the environment the club will run in, to warn when it differs from the backed-up one. */
  authSecretEnv?: string;
}

export interface RestoreResult {
  manifest: BackupManifest;
  counts: BackupCounts;
  photoFiles: number;
  warnings: string[];
}

// Only these names may come out of an archive: nothing can be written outside the target.
const allowedEntry =
  /^(manifest\.json|auth-secret|database\/(pgdata\.tar|tanklore\.pgdump)|uploads\/[\w-]+(\/[\w.-]+)*)$/;

async function extract(file: string, into: string): Promise<void> {
  const ex = tar.extract();
  const done = pipeline(fs.createReadStream(file), zlib.createGunzip(), ex);
  try {
    for await (const entry of ex) {
      const name = entry.header.name;
      if (entry.header.type !== "file" || !allowedEntry.test(name) || name.split("/").includes("..")) {
        entry.resume();
        throw new RestoreRefusedError(
          `The archive holds an unexpected entry "${name}"; it is not a Tanklore backup. Nothing was restored.`,
        );
      }
      const out = path.join(into, name);
      await fsp.mkdir(path.dirname(out), { recursive: true });
      await pipeline(entry, fs.createWriteStream(out, { mode: 0o600 }));
    }
    await done;
  } catch (err) {
    ex.destroy();
    await done.catch(() => undefined);
    if (err instanceof RestoreRefusedError) throw err;
    throw new RestoreRefusedError(
      `The archive could not be read (${(err as Error).message}); it is damaged or not a Tanklore backup. Nothing was restored.`,
      { cause: err },
    );
  }
}

async function sha256(file: string): Promise<string> {
  const hash = crypto.createHash("sha256");
  await pipeline(fs.createReadStream(file), hash);
  return hash.digest("hex");
}

/** Reads the manifest and checks every file against it: size, checksum, and nothing more or less. */
async function verify(dir: string): Promise<BackupManifest> {
  const manifestFile = path.join(dir, archivePaths.manifest);
  if (!fs.existsSync(manifestFile))
    throw new RestoreRefusedError(
      "The archive has no manifest.json; it is not a Tanklore backup. Nothing was restored.",
    );
  const manifest = JSON.parse(await fsp.readFile(manifestFile, "utf8")) as BackupManifest;
  if (manifest.format !== BACKUP_FORMAT)
    throw new RestoreRefusedError("The archive's manifest is not a Tanklore backup's. Nothing was restored.");
  if (manifest.formatVersion > BACKUP_FORMAT_VERSION) {
    throw new RestoreRefusedError(
      `The archive was made by a newer Tanklore (backup format ${manifest.formatVersion}, app ${manifest.appVersion}); update this copy first. Nothing was restored.`,
    );
  }
  const listed = new Set(manifest.files.map((f) => f.path));
  for (const f of manifest.files) {
    const abs = path.join(dir, f.path);
    if (!fs.existsSync(abs))
      throw new RestoreRefusedError(
        `The archive lacks ${f.path}, which its manifest lists; it is incomplete. Nothing was restored.`,
      );
    const [size, sum] = [(await fsp.stat(abs)).size, await sha256(abs)];
    if (size !== f.bytes || sum !== f.sha256)
      throw new RestoreRefusedError(
        `${f.path} does not match its checksum in the manifest; the archive is damaged. Nothing was restored.`,
      );
  }
  for (const rel of await walk(dir)) {
    if (rel !== archivePaths.manifest && !listed.has(rel))
      throw new RestoreRefusedError(
        `The archive holds ${rel}, which its manifest does not list; it has been altered. Nothing was restored.`,
      );
  }
  return manifest;
}

async function walk(dir: string, prefix = ""): Promise<string[]> {
  const out: string[] = [];
  for (const e of await fsp.readdir(path.join(dir, prefix), { withFileTypes: true })) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...(await walk(dir, rel)));
    else out.push(rel);
  }
  return out;
}

/** Refuses a data directory holding anything but a backups/ folder (where the nightly archives may sit). */
function assertEmptyDataDir(dir: string): void {
  if (!fs.existsSync(dir)) return;
  if (!fs.statSync(dir).isDirectory())
    throw new RestoreRefusedError(`${dir} is not a directory. Nothing was restored.`);
  const found = fs
    .readdirSync(dir)
    .filter((n) => n !== "backups")
    .sort();
  if (found.length) {
    throw new RestoreRefusedError(
      `The data directory ${dir} is not empty (it holds ${found.slice(0, 5).join(", ")}${found.length > 5 ? ", …" : ""}). ` +
        "A restore never overwrites a club: point DATA_DIR at a new, empty directory (a backups/ folder in it is fine), or move the old one aside first. Nothing was restored.",
    );
  }
}

async function assertEmptyDatabase(url: string): Promise<void> {
  const client = new pg.Client({ connectionString: url });
  try {
    await client.connect();
  } catch (err) {
    throw new RestoreRefusedError(
      `Could not connect to DATABASE_URL (${(err as Error).message}). Nothing was restored.`,
    );
  }
  try {
    const r = await client.query<{ n: string }>(
      "select count(*)::text as n from information_schema.tables where table_schema not in ('pg_catalog', 'information_schema')",
    );
    if (Number(r.rows[0]!.n) > 0) {
      throw new RestoreRefusedError(
        `The database at DATABASE_URL is not empty (it holds ${r.rows[0]!.n} tables). A restore never overwrites a club: create a new, empty database and point DATABASE_URL at it. Nothing was restored.`,
      );
    }
  } finally {
    await client.end();
  }
}

async function pgRestore(url: string, file: string): Promise<void> {
  try {
    const { dbname, env } = pgToolConnection(url);
    await run("pg_restore", ["--no-owner", "--no-privileges", "--exit-on-error", `--dbname=${dbname}`, file], {
      env,
      maxBuffer: 16 * 1024 * 1024,
    });
  } catch (err) {
    const e = err as NodeJS.ErrnoException & { stderr?: string };
    if (e.code === "ENOENT")
      throw new RestoreRefusedError(
        "pg_restore was not found on PATH; install the PostgreSQL client tools (the server's major version). Nothing was restored.",
      );
    throw new Error(
      `pg_restore failed: ${e.stderr?.trim() || e.message}. The database at DATABASE_URL may hold part of the club: drop and recreate it before trying again.`,
      { cause: err },
    );
  }
}

/**
 * Restores a backup archive into an empty target and checks that the restored club holds what the manifest
 * counted. A failure after the target was touched undoes what was written to the data directory.
 */
export async function restoreBackup(file: string, target: RestoreTarget): Promise<RestoreResult> {
  if (!fs.existsSync(file)) throw new RestoreRefusedError(`No such file: ${file}. Nothing was restored.`);
  const dataDir = path.resolve(target.dataDir);
  assertEmptyDataDir(dataDir);
  if (target.databaseUrl) await assertEmptyDatabase(target.databaseUrl);

  const work = await fsp.mkdtemp(path.join(os.tmpdir(), "tanklore-restore-"));
  const written: string[] = [];
  let lock: string | null = null;
  try {
    await extract(file, work);
    const manifest = await verify(work);
    if (manifest.database.kind === "pglite" && target.databaseUrl) {
      throw new RestoreRefusedError(
        "This archive holds an embedded (PGlite) database; unset DATABASE_URL to restore it into DATA_DIR. Nothing was restored.",
      );
    }
    if (manifest.database.kind === "postgres" && !target.databaseUrl) {
      throw new RestoreRefusedError(
        "This archive holds a PostgreSQL server's dump; set DATABASE_URL to an empty database to restore it. Nothing was restored.",
      );
    }

    await fsp.mkdir(dataDir, { recursive: true });
    const pgdata = path.join(dataDir, "pgdata");
    // Hold the data directory's lock so the app cannot open it half-restored.
    lock = acquireLock(pgdata);
    let counts: BackupCounts;
    if (manifest.database.kind === "pglite") {
      written.push(pgdata);
      await fsp.mkdir(pgdata, { recursive: true });
      const tarball = await fsp.readFile(path.join(work, manifest.database.file));
      const client = await PGlite.create(pgdata, pgliteOptions({ loadDataDir: new Blob([new Uint8Array(tarball)]) }));
      try {
        counts = await countClub(drizzlePglite({ client, schema, casing: "snake_case" }) as unknown as Db);
      } finally {
        await client.close();
      }
    } else {
      await pgRestore(target.databaseUrl!, path.join(work, manifest.database.file));
      const pool = new pg.Pool({ connectionString: target.databaseUrl, max: 1 });
      try {
        counts = await countClub(drizzlePg({ client: pool, schema, casing: "snake_case" }) as unknown as Db);
      } finally {
        await pool.end();
      }
    }
    for (const k of Object.keys(manifest.counts) as (keyof BackupCounts)[]) {
      if (counts[k] !== manifest.counts[k])
        throw new Error(
          `The restored database holds ${counts[k]} ${k} where the backup counted ${manifest.counts[k]}.`,
        );
    }

    const uploads = path.join(work, "uploads");
    let photoFiles = 0;
    if (fs.existsSync(uploads)) {
      const storage = objectStorage();
      const photoPaths = manifest.files.filter((f) => f.path.startsWith(archivePaths.uploads)).map((f) => f.path);
      if (storage.kind === "s3") {
        // Several processes share the bucket: the photos go there (same keys), not into this machine's data directory.
        for (const rel of photoPaths) await storage.putFile(rel, path.join(work, rel), "image/jpeg");
      } else {
        written.push(path.join(dataDir, "uploads"));
        await fsp.cp(uploads, path.join(dataDir, "uploads"), { recursive: true });
      }
      photoFiles = photoPaths.length;
    }
    const warnings: string[] = [];
    if (manifest.authSecret.source === "file") {
      written.push(path.join(dataDir, "auth-secret"));
      await fsp.copyFile(path.join(work, archivePaths.secret), path.join(dataDir, "auth-secret"));
      await fsp.chmod(path.join(dataDir, "auth-secret"), 0o600);
      if (target.authSecretEnv)
        warnings.push(
          "BETTER_AUTH_SECRET is set here and takes precedence over the restored auth-secret file; unset it, or sessions and export pseudonyms will change.",
        );
    } else if (manifest.authSecret.source === "environment") {
      if (!target.authSecretEnv)
        warnings.push(
          "The backed-up club took its secret from BETTER_AUTH_SECRET, which the archive does not hold: set the same value before starting, or members must sign in again and export pseudonyms change.",
        );
      else if (secretFingerprint(target.authSecretEnv) !== manifest.authSecret.fingerprint)
        warnings.push(
          "BETTER_AUTH_SECRET differs from the backed-up club's: set the old value, or members must sign in again and export pseudonyms change.",
        );
    }
    if (photoFiles < counts.photos * 2)
      warnings.push(
        `${counts.photos * 2 - photoFiles} photo files named by the database were missing when the backup was taken.`,
      );
    return { manifest, counts, photoFiles, warnings };
  } catch (err) {
    for (const p of written.reverse()) await fsp.rm(p, { recursive: true, force: true });
    throw err;
  } finally {
    if (lock) releaseLock(lock);
    await fsp.rm(work, { recursive: true, force: true });
  }
}
