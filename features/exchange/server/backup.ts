import "server-only";
import crypto from "node:crypto";
import { execFile } from "node:child_process";
import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { promisify } from "node:util";
import zlib from "node:zlib";
import { and, count, eq, isNull, lt, or, sql } from "drizzle-orm";
import tar from "tar-stream";
import { dumpEmbeddedDataDir, getDb, getDbKind, schema, type Db, type DbKind } from "@/db/client";
import { AppError } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { dataDir, getEnv } from "@/features/shared/env";
import { authorize, canTakeBackups } from "@/features/shared/policies";
import { objectStorage, type ObjectStorage } from "@/features/shared/server/object-storage";
import { registerJob } from "@/features/shared/server/jobs";

const run = promisify(execFile);

export const BACKUP_FORMAT = "tanklore-backup";
export const BACKUP_FORMAT_VERSION = 1;
/** Where each part of a club sits inside an archive. */
export const archivePaths = {
  manifest: "manifest.json",
  pglite: "database/pgdata.tar",
  postgres: "database/tanklore.pgdump",
  uploads: "uploads/",
  secret: "auth-secret",
} as const;

export interface BackupCounts {
  reports: number;
  reportEvents: number;
  evidenceSummaries: number;
  photos: number;
  users: number;
}

export interface BackupManifest {
  format: typeof BACKUP_FORMAT;
  formatVersion: number;
  appVersion: string;
  createdAt: string;
  database: { kind: DbKind; file: string };
  counts: BackupCounts;
  /** "file": DATA_DIR/auth-secret is in the archive; "environment": BETTER_AUTH_SECRET was set and is not. */
  authSecret: { source: "file" | "environment" | "none"; fingerprint: string | null };
  files: { path: string; bytes: number; sha256: string }[];
}

export function backupsDir(): string {
  return path.join(dataDir(), "backups");
}

/** Whoever sees the fingerprint learns nothing of the secret, yet a restore can tell whether the same one is set. */
export function secretFingerprint(secret: string): string {
  return crypto.createHash("sha256").update(`tanklore-secret-fingerprint:${secret}`).digest("hex").slice(0, 16);
}

function appVersion(): string {
  try {
    return JSON.parse(fs.readFileSync(path.resolve(process.cwd(), "package.json"), "utf8")).version ?? "unknown";
  } catch {
    return "unknown";
  }
}

async function sha256File(file: string): Promise<string> {
  const hash = crypto.createHash("sha256");
  await pipeline(fs.createReadStream(file), hash);
  return hash.digest("hex");
}

/** Counts of what matters most, read in the given transaction (the backup's snapshot) or on a restored database. */
export async function countClub(db: Db): Promise<BackupCounts> {
  const n = async (t: Parameters<ReturnType<Db["select"]>["from"]>[0]) =>
    (await db.select({ n: count() }).from(t))[0]!.n;
  return {
    reports: await n(schema.reports),
    reportEvents: await n(schema.reportEvents),
    evidenceSummaries: await n(schema.evidenceSummaries),
    photos: await n(schema.photos),
    users: await n(schema.users),
  };
}

/** A hard link is an instant, stable copy (photo files are replaced by rename, never rewritten); a copy where links fail. */
async function linkOrCopy(from: string, to: string): Promise<boolean> {
  await fsp.mkdir(path.dirname(to), { recursive: true });
  try {
    await fsp.link(from, to);
    return true;
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === "ENOENT") return false;
    if (code === "EXDEV" || code === "EPERM" || code === "ENOTSUP") {
      await fsp.copyFile(from, to);
      return true;
    }
    throw err;
  }
}

/** A photo from the bucket into the staging folder (objects are written whole, never changed in place). */
async function fetchObject(storage: ObjectStorage, key: string, to: string): Promise<void> {
  const data = await storage.get(key);
  if (!data) return;
  await fsp.mkdir(path.dirname(to), { recursive: true });
  await fsp.writeFile(to, data, { mode: 0o600 });
}

interface Staged {
  dir: string;
  manifest: BackupManifest;
}

/**
 * Takes the club's snapshot into a staging folder inside DATA_DIR/backups: the database dump and hard links to
 * the photos its rows name, both read in one transaction so they agree. On PGlite no other statement runs
 * meanwhile (its single connection is held, so the dump never sees half a change); on a PostgreSQL server,
 * pg_dump reads the same snapshot as the transaction, and writers carry on.
 */
async function stage(): Promise<Staged> {
  const db = await getDb();
  const kind = await getDbKind();
  const dir = path.join(backupsDir(), `.staging-${Date.now()}-${crypto.randomBytes(4).toString("hex")}`);
  await fsp.mkdir(dir, { recursive: true });
  try {
    const storage = objectStorage();
    const uploadsRoot = path.join(dataDir(), "uploads");
    const dbFile = kind === "pglite" ? archivePaths.pglite : archivePaths.postgres;
    let takenAt = new Date();
    const counts = await db.transaction(
      async (tx) => {
        takenAt = new Date();
        const snapshot =
          kind === "postgres"
            ? String(
                ((await tx.execute(sql`select pg_export_snapshot() as s`)) as unknown as { rows: { s: string }[] })
                  .rows[0]!.s,
              )
            : null;
        const counts = await countClub(tx as unknown as Db);
        const photos = await tx
          .select({ full: schema.photos.fullKey, thumb: schema.photos.thumbKey })
          .from(schema.photos);
        for (const p of photos) {
          for (const key of [p.full, p.thumb]) {
            // A row whose file is already gone (removed by hand) cannot be helped; restore reports the count.
            if (storage.kind === "disk")
              await linkOrCopy(path.join(uploadsRoot, key), path.join(dir, archivePaths.uploads, key));
            else await fetchObject(storage, `${archivePaths.uploads}${key}`, path.join(dir, archivePaths.uploads, key));
          }
        }
        await fsp.mkdir(path.join(dir, "database"), { recursive: true });
        if (kind === "pglite") {
          // In the app served by `npm start` the embedded database runs in its own process, which writes the dump.
          await dumpEmbeddedDataDir(path.join(dir, dbFile));
        } else {
          await pgDump(snapshot!, path.join(dir, dbFile));
        }
        return counts;
      },
      { isolationLevel: "repeatable read", accessMode: "read only" },
    );

    const env = getEnv();
    let authSecret: BackupManifest["authSecret"] = { source: "none", fingerprint: null };
    const secretFile = path.join(dataDir(), "auth-secret");
    if (env.BETTER_AUTH_SECRET) {
      authSecret = { source: "environment", fingerprint: secretFingerprint(env.BETTER_AUTH_SECRET) };
    } else if (fs.existsSync(secretFile)) {
      await fsp.copyFile(secretFile, path.join(dir, archivePaths.secret));
      authSecret = { source: "file", fingerprint: secretFingerprint(fs.readFileSync(secretFile, "utf8").trim()) };
    }

    const files: BackupManifest["files"] = [];
    for (const rel of await listFiles(dir)) {
      const abs = path.join(dir, rel);
      files.push({ path: rel, bytes: (await fsp.stat(abs)).size, sha256: await sha256File(abs) });
    }
    const manifest: BackupManifest = {
      format: BACKUP_FORMAT,
      formatVersion: BACKUP_FORMAT_VERSION,
      appVersion: appVersion(),
      createdAt: takenAt.toISOString(),
      database: { kind, file: dbFile },
      counts,
      authSecret,
      files,
    };
    return { dir, manifest };
  } catch (err) {
    await fsp.rm(dir, { recursive: true, force: true });
    throw err;
  }
}

/** A connection URL for the PostgreSQL tools with its password moved to PGPASSWORD, out of the process list. */
export function pgToolConnection(url: string): { dbname: string; env: NodeJS.ProcessEnv } {
  const u = new URL(url);
  const password = decodeURIComponent(u.password);
  u.password = "";
  return { dbname: u.toString(), env: password ? { ...process.env, PGPASSWORD: password } : process.env };
}

async function pgDump(snapshot: string, file: string): Promise<void> {
  const { dbname, env } = pgToolConnection(getEnv().DATABASE_URL!);
  try {
    await run("pg_dump", ["--format=custom", `--snapshot=${snapshot}`, `--file=${file}`, `--dbname=${dbname}`], {
      env,
      maxBuffer: 16 * 1024 * 1024,
    });
  } catch (err) {
    const e = err as NodeJS.ErrnoException & { stderr?: string };
    if (e.code === "ENOENT")
      throw new AppError(
        "internal",
        "pg_dump was not found on the server's PATH; install the PostgreSQL client tools (the same major version as the server) to take backups.",
      );
    throw new Error(`pg_dump failed: ${e.stderr?.trim() || e.message}`, { cause: err });
  }
}

/** Every file under `dir`, as forward-slash paths relative to it, sorted. */
async function listFiles(dir: string, prefix = ""): Promise<string[]> {
  const out: string[] = [];
  for (const e of await fsp.readdir(path.join(dir, prefix), { withFileTypes: true })) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...(await listFiles(dir, rel)));
    else if (e.isFile()) out.push(rel);
  }
  return out.sort();
}

/**
 * Streams the staged snapshot as tar.gz, manifest first. The staging folder is removed when the stream ends
 * either way; `cleaned` settles once it is gone.
 */
function archiveStream(staged: Staged): { stream: Readable; cleaned: Promise<void> } {
  const pack = tar.pack();
  const gzip = zlib.createGzip();
  const mtime = new Date(staged.manifest.createdAt);
  (async () => {
    pack.entry({ name: archivePaths.manifest, mtime, mode: 0o600 }, JSON.stringify(staged.manifest, null, 2) + "\n");
    for (const f of staged.manifest.files) {
      const entry = pack.entry({ name: f.path, size: f.bytes, mtime, mode: 0o600 });
      await pipeline(fs.createReadStream(path.join(staged.dir, f.path)), entry);
    }
    pack.finalize();
  })().catch((err) => pack.destroy(err));
  const stream = pack.pipe(gzip);
  pack.on("error", (err) => gzip.destroy(err));
  const cleaned = new Promise<void>((resolve) => gzip.once("close", resolve)).then(() =>
    fsp.rm(staged.dir, { recursive: true, force: true }),
  );
  return { stream, cleaned };
}

export function backupFileName(createdAt: string): string {
  return `tanklore-backup-${createdAt.replace(/[:.]/g, "-")}.tar.gz`;
}

/** GET /api/admin/backup: a consistent archive of the running club, for admins only. */
export async function createBackup({
  actor,
}: {
  actor: Actor | null;
}): Promise<{ stream: ReadableStream<Uint8Array>; fileName: string; manifest: BackupManifest }> {
  authorize(actor, canTakeBackups, "download a backup of the club");
  const staged = await stage();
  return {
    stream: Readable.toWeb(archiveStream(staged).stream) as ReadableStream<Uint8Array>,
    fileName: backupFileName(staged.manifest.createdAt),
    manifest: staged.manifest,
  };
}

/** Writes a backup into `dir` (written under a temporary name, then renamed, so a listed archive is complete). */
export async function writeBackupFile(dir = backupsDir()): Promise<{ file: string; manifest: BackupManifest }> {
  const staged = await stage();
  await fsp.mkdir(dir, { recursive: true });
  const file = path.join(dir, backupFileName(staged.manifest.createdAt));
  const partial = `${file}.partial`;
  const archive = archiveStream(staged);
  try {
    await pipeline(archive.stream, fs.createWriteStream(partial, { mode: 0o600 }));
    await fsp.rename(partial, file);
  } catch (err) {
    await fsp.rm(partial, { force: true });
    throw err;
  } finally {
    await archive.cleaned;
  }
  return { file, manifest: staged.manifest };
}

const NIGHTLY_KEEP = 7;
const DAY = 24 * 3600_000;

/** Keeps the newest `keep` archives in `dir` (names sort by time); leftovers of a killed run older than a day go too. */
export async function pruneBackups(dir = backupsDir(), keep = NIGHTLY_KEEP, now = new Date()): Promise<string[]> {
  if (!fs.existsSync(dir)) return [];
  const names = await fsp.readdir(dir);
  const archives = names.filter((n) => /^tanklore-backup-[\dTZ-]+\.tar\.gz$/.test(n)).sort();
  const removed = archives.slice(0, Math.max(0, archives.length - keep));
  for (const n of names.filter((n) => n.startsWith(".staging-") || n.endsWith(".partial"))) {
    const st = await fsp.stat(path.join(dir, n)).catch(() => null);
    if (st && now.getTime() - st.mtimeMs > DAY) removed.push(n);
  }
  for (const n of removed) await fsp.rm(path.join(dir, n), { recursive: true, force: true });
  return removed;
}

/** The start of the nightly slot due at `now`: today's 03:00 server time, or yesterday's before then. */
export function nightlySlot(now: Date): Date {
  const slot = new Date(now);
  slot.setHours(3, 0, 0, 0);
  if (slot.getTime() > now.getTime()) slot.setDate(slot.getDate() - 1);
  return slot;
}

/**
 * Takes the nightly backup when the club has it on and tonight's has not been taken. The run is claimed in the
 * database first (one conditional update), so a restart or a second process never runs the same night twice.
 */
export async function runNightlyBackupIfDue(now = new Date()): Promise<{ file: string } | null> {
  const db = await getDb();
  const slot = nightlySlot(now);
  const claimed = await db
    .update(schema.clubSettings)
    .set({ lastNightlyBackupAt: now })
    .where(
      and(
        eq(schema.clubSettings.id, 1),
        eq(schema.clubSettings.nightlyBackup, true),
        or(isNull(schema.clubSettings.lastNightlyBackupAt), lt(schema.clubSettings.lastNightlyBackupAt, slot)),
      ),
    )
    .returning({ id: schema.clubSettings.id });
  if (!claimed.length) return null;
  try {
    const { file } = await storeBackupFile();
    await pruneStoredBackups(NIGHTLY_KEEP, now);
    return { file };
  } catch (err) {
    // Not taken after all: free tonight's slot, so the job's retry (or the next round) takes it.
    await db
      .update(schema.clubSettings)
      .set({ lastNightlyBackupAt: null })
      .where(and(eq(schema.clubSettings.id, 1), eq(schema.clubSettings.lastNightlyBackupAt, now)));
    throw err;
  }
}

/**
 * Writes a backup where the club keeps its files: DATA_DIR/backups, or backups/ in the bucket when S3_* is set
 * (written locally first, then uploaded and the local copy removed). Returns the file or object it wrote.
 */
export async function storeBackupFile(): Promise<{ file: string; manifest: BackupManifest }> {
  const storage = objectStorage();
  const written = await writeBackupFile();
  if (storage.kind === "disk") return written;
  const key = `backups/${path.basename(written.file)}`;
  try {
    await storage.putFile(key, written.file, "application/gzip");
  } finally {
    await fsp.rm(written.file, { force: true });
  }
  return { file: `${storage.describe()}: ${key}`, manifest: written.manifest };
}

/** pruneBackups for the club's own storage: the data directory, or backups/ in the bucket. */
export async function pruneStoredBackups(keep = NIGHTLY_KEEP, now = new Date()): Promise<string[]> {
  const storage = objectStorage();
  if (storage.kind === "disk") return pruneBackups(backupsDir(), keep, now);
  const archives = (await storage.list("backups/"))
    .map((o) => o.key)
    .filter((k) => /^backups\/tanklore-backup-[\dTZ-]+\.tar\.gz$/.test(k))
    .sort();
  const removed = archives.slice(0, Math.max(0, archives.length - keep));
  for (const k of removed) await storage.remove(k);
  // Leftovers of a killed local write before upload.
  await pruneBackups(backupsDir(), Number.MAX_SAFE_INTEGER, now);
  return removed;
}

/** The nightly-backup check runs every ten minutes in whichever process claims it (features/shared/server/jobs.ts). */
registerJob("nightly-backup", {
  everyMs: 10 * 60_000,
  // A large club's archive takes a while: others wait this long before taking a silent run over.
  leaseMs: 60 * 60_000,
  run: async (_payload, { now }) => {
    await runNightlyBackupIfDue(now);
  },
});

/** Kept for callers of the old per-process timer: the job runner now runs the check. */
export function startBackupScheduler(): void {}
