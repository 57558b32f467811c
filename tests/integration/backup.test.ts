import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import type { ReadableStream as NodeReadableStream } from "node:stream/web";
import { pipeline } from "node:stream/promises";
import { promisify } from "node:util";
import zlib from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PGlite } from "@electric-sql/pglite";
import { drizzle } from "drizzle-orm/pglite";
import { and, desc, eq, sql } from "drizzle-orm";
import sharp from "sharp";
import tar from "tar-stream";
import * as backupRoute from "@/app/api/admin/backup/route";
import * as settingsRoute from "@/app/api/admin/settings/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { dataDir } from "@/features/shared/env";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import {
  pruneBackups,
  restoreBackup,
  RestoreRefusedError,
  runNightlyBackupIfDue,
  type BackupManifest,
} from "@/features/exchange/server";
import { BASE, call } from "../support/http";
import { reportBody, signIn } from "../support/factories";

const exec = promisify(execFile);
const PASSWORD = "backup-demo-pass";
let admin = "",
  moderator = "",
  member = "";
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-backup-test-"));
let photoId = "";

afterAll(() => fs.rmSync(scratch, { recursive: true, force: true }));

beforeAll(async () => {
  await seedDemo(await getDb(), { password: PASSWORD });
  admin = await signIn("admin@example.org", PASSWORD);
  moderator = await signIn("moderator@example.org", PASSWORD);
  member = await signIn("member@example.org", PASSWORD);
  // A draft with a photo, and a freshly accepted report, on top of the demo club's summaries.
  const draft = await call(reportsRoute.POST, "/api/reports", { body: reportBody(), cookie: member });
  const form = new FormData();
  const jpeg = await sharp({ create: { width: 400, height: 300, channels: 3, background: { r: 20, g: 90, b: 120 } } })
    .jpeg()
    .toBuffer();
  form.set("file", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "tank.jpg");
  form.set("stage", "before");
  const up = await photosRoute.POST(
    new Request(`${BASE}/api/reports/${draft.body.id}/photos`, {
      method: "POST",
      body: form,
      headers: { cookie: member, origin: BASE },
    }),
    {
      params: Promise.resolve({ id: draft.body.id }),
    },
  );
  expect(up.status).toBe(201);
  photoId = (await up.json()).id;
  const filed = await call(reportsRoute.POST, "/api/reports", { body: reportBody({ submit: true }), cookie: member });
  const accepted = await call(decisionRoute.POST, `/api/reports/${filed.body.id}/decision`, {
    params: { id: filed.body.id },
    cookie: moderator,
    body: { decision: "accept" },
  });
  expect(accepted.body.status).toBe("accepted");
  // The decision queued its recompute; no worker runs in tests, so drain it before the club is compared.
  await drainEvidenceOutbox();
});

/** Takes a backup through the route handler as `cookie` and saves it to a file. */
async function downloadBackup(cookie: string, name: string): Promise<string> {
  const res = await backupRoute.GET(new Request(`${BASE}/api/admin/backup`, { headers: { cookie } }), {
    params: Promise.resolve({}),
  });
  expect(res.status).toBe(200);
  expect(res.headers.get("content-type")).toBe("application/gzip");
  expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="tanklore-backup-.+\.tar\.gz"$/);
  const file = path.join(scratch, name);
  await pipeline(Readable.fromWeb(res.body as NodeReadableStream), fs.createWriteStream(file));
  return file;
}

/** The entries of a tar.gz archive, in order. */
async function entriesOf(file: string): Promise<{ name: string; data: Buffer }[]> {
  const out: { name: string; data: Buffer }[] = [];
  const ex = tar.extract();
  const done = pipeline(fs.createReadStream(file), zlib.createGunzip(), ex);
  for await (const e of ex) {
    const chunks: Buffer[] = [];
    for await (const c of e) chunks.push(c as Buffer);
    out.push({ name: e.header.name, data: Buffer.concat(chunks) });
  }
  await done;
  return out;
}

async function repack(entries: { name: string; data: Buffer }[], file: string): Promise<void> {
  const pack = tar.pack();
  for (const e of entries) pack.entry({ name: e.name }, e.data);
  pack.finalize();
  await pipeline(pack, zlib.createGzip(), fs.createWriteStream(file));
}

const tables = {
  reports: "select * from reports order by id",
  report_events: "select * from report_events order by id",
  evidence_summaries: "select * from evidence_summaries order by group_slug, agent_slug, condition_slug",
  photos: "select * from photos order by id",
  club_settings: "select * from club_settings",
} as const;

async function liveRows(query: string): Promise<unknown[]> {
  const r = (await (await getDb()).execute(sql.raw(query))) as unknown as { rows: unknown[] };
  return r.rows;
}

/** Opens a restored data directory through Drizzle, as the app would, so its rows read like the live ones. */
async function withRestored<T>(
  dir: string,
  fn: (rows: (query: string) => Promise<unknown[]>) => Promise<T>,
): Promise<T> {
  const client = await PGlite.create(path.join(dir, "pgdata"));
  const db = drizzle({ client, schema, casing: "snake_case" });
  try {
    return await fn(async (query) => ((await db.execute(sql.raw(query))) as unknown as { rows: unknown[] }).rows);
  } finally {
    await client.close();
  }
}

function listing(dir: string): string[] {
  return fs.existsSync(dir) ? fs.readdirSync(dir, { recursive: true }).map(String).sort() : [];
}

describe("GET /api/admin/backup", () => {
  it("gives visitors 401 and members and moderators 403, with no archive and nothing left behind", async () => {
    for (const [cookie, status] of [
      [undefined, 401],
      [member, 403],
      [moderator, 403],
    ] as const) {
      const r = await call(backupRoute.GET, "/api/admin/backup", { cookie });
      expect(r.status).toBe(status);
      expect(r.res.headers.get("content-type")).toMatch(/application\/json/);
      expect(r.body.error.code).toBe(status === 401 ? "unauthenticated" : "forbidden");
    }
    expect(listing(path.join(dataDir(), "backups"))).toEqual([]);
  });

  it("restores into an empty directory with identical reports, events, summaries, settings and photo bytes", async () => {
    const file = await downloadBackup(admin, "quiet.tar.gz");
    const entries = await entriesOf(file);
    expect(entries[0]!.name).toBe("manifest.json");
    const manifest = JSON.parse(entries[0]!.data.toString("utf8")) as BackupManifest;
    const [reports, events, summaries, photos] = await Promise.all(
      ["reports", "report_events", "evidence_summaries", "photos"].map(
        async (t) => (await liveRows(`select * from ${t}`)).length,
      ),
    );
    expect(manifest).toMatchObject({
      format: "tanklore-backup",
      formatVersion: 1,
      database: { kind: "pglite", file: "database/pgdata.tar" },
      counts: { reports, reportEvents: events, evidenceSummaries: summaries, photos },
      // The tests run with BETTER_AUTH_SECRET set, so the secret stays out of the archive and only its fingerprint is kept.
      authSecret: { source: "environment", fingerprint: expect.stringMatching(/^[0-9a-f]{16}$/) },
    });
    expect(reports).toBeGreaterThan(150);
    expect(summaries).toBeGreaterThan(0);
    expect(photos).toBe(1);
    expect(entries.map((e) => e.name).filter((n) => n.startsWith("uploads/"))).toHaveLength(2);
    await expect.poll(() => listing(path.join(dataDir(), "backups"))).toEqual([]); // the staging folder goes once the stream ends

    const target = path.join(scratch, "restored-quiet");
    const result = await restoreBackup(file, { dataDir: target, authSecretEnv: process.env.BETTER_AUTH_SECRET });
    expect(result.counts).toEqual(manifest.counts);
    expect(result.photoFiles).toBe(2);
    expect(result.warnings).toEqual([]);

    await withRestored(target, async (rows) => {
      for (const q of Object.values(tables)) expect(await rows(q)).toEqual(await liveRows(q));
    });
    const [photo] = await (await getDb()).select().from(schema.photos).where(eq(schema.photos.id, photoId));
    for (const key of [photo!.fullKey, photo!.thumbKey]) {
      const restored = fs.readFileSync(path.join(target, "uploads", key));
      expect(restored.equals(fs.readFileSync(path.join(dataDir(), "uploads", key)))).toBe(true);
      expect((await sharp(restored).metadata()).format).toBe("jpeg");
    }
  }, 240_000);

  it("takes a consistent archive while members keep filing reports, restorable with `npm run restore`", async () => {
    const before = (await liveRows("select id from reports")).length;
    // Writes start before the backup and go on while it is taken; none may fail or be half in the archive.
    const writes = Array.from({ length: 8 }, (_, i) =>
      new Promise((r) => setTimeout(r, i * 40)).then(() =>
        call(reportsRoute.POST, "/api/reports", {
          body: reportBody({ submit: true, fishCount: 3 + i }),
          cookie: member,
        }),
      ),
    );
    const file = await downloadBackup(admin, "busy.tar.gz");
    const results = await Promise.all(writes);
    expect(results.map((r) => r.status)).toEqual(Array(8).fill(201));
    expect((await liveRows("select id from reports")).length).toBe(before + 8);

    const target = path.join(scratch, "restored-busy");
    const cli = await exec(
      path.resolve("node_modules/.bin/tsx"),
      ["--conditions=react-server", "db/restore.ts", file],
      {
        env: { ...process.env, DATA_DIR: target, DATABASE_URL: "" },
        timeout: 180_000,
      },
    );
    expect(cli.stdout).toMatch(/^Restored busy\.tar\.gz .*every checksum matched/);
    expect(cli.stdout).toMatch(/\d+ reports, \d+ report events, \d+ evidence summaries/);

    const manifest = JSON.parse((await entriesOf(file))[0]!.data.toString("utf8")) as BackupManifest;
    expect(manifest.counts.reports).toBeGreaterThanOrEqual(before);
    expect(manifest.counts.reports).toBeLessThanOrEqual(before + 8);
    await withRestored(target, async (read) => {
      const rows = (await read(
        "select r.id, r.status, (select count(*)::int from report_events e where e.report_id = r.id) as events from reports r order by r.id",
      )) as { id: string }[];
      expect(rows).toHaveLength(manifest.counts.reports);
      // Each report in the archive is whole: the rows of one change are all there or not at all.
      const live = new Map(
        (
          await liveRows(
            "select r.id, r.status, (select count(*)::int from report_events e where e.report_id = r.id) as events from reports r",
          )
        ).map((r) => [(r as { id: string }).id, r]),
      );
      for (const r of rows) expect(r).toEqual(live.get(r.id));
    });
  }, 300_000);
});

describe("npm run restore refuses what it must not do", () => {
  let file = "";
  beforeAll(async () => {
    file = await downloadBackup(admin, "for-refusals.tar.gz");
  }, 120_000);

  it("refuses a data directory that holds anything, and leaves it as it was", async () => {
    const target = path.join(scratch, "occupied");
    fs.mkdirSync(path.join(target, "uploads"), { recursive: true });
    fs.writeFileSync(path.join(target, "notes.txt"), "keep me");
    await expect(restoreBackup(file, { dataDir: target })).rejects.toThrow(RestoreRefusedError);
    await expect(restoreBackup(file, { dataDir: target })).rejects.toThrow(
      /is not empty \(it holds notes\.txt, uploads\).*Nothing was restored/,
    );
    expect(listing(target)).toEqual(["notes.txt", "uploads"]);
    expect(fs.readFileSync(path.join(target, "notes.txt"), "utf8")).toBe("keep me");

    const cli = await exec(
      path.resolve("node_modules/.bin/tsx"),
      ["--conditions=react-server", "db/restore.ts", file],
      { env: { ...process.env, DATA_DIR: target, DATABASE_URL: "" } },
    ).catch((e) => e);
    expect(cli.code).toBe(1);
    expect(cli.stderr).toMatch(/is not empty/);
  }, 120_000);

  it("refuses an archive whose photo does not match its checksum, writing nothing", async () => {
    const entries = await entriesOf(file);
    const photo = entries.find((e) => e.name.startsWith("uploads/"))!;
    photo.data = Buffer.from(photo.data);
    const at = photo.data.length - 3;
    photo.data[at] = photo.data[at]! ^ 0xff;
    const tampered = path.join(scratch, "tampered.tar.gz");
    await repack(entries, tampered);
    const target = path.join(scratch, "from-tampered");
    await expect(restoreBackup(tampered, { dataDir: target })).rejects.toThrow(
      /does not match its checksum.*Nothing was restored/,
    );
    expect(listing(target)).toEqual([]);
  }, 120_000);

  it("refuses a file that is not a backup, and an archive with an entry outside its layout", async () => {
    const junk = path.join(scratch, "junk.tar.gz");
    fs.writeFileSync(junk, "not an archive at all");
    await expect(restoreBackup(junk, { dataDir: path.join(scratch, "from-junk") })).rejects.toThrow(
      /could not be read.*Nothing was restored/,
    );
    const entries = await entriesOf(file);
    const extra = path.join(scratch, "extra.tar.gz");
    await repack([...entries, { name: "../escape.txt", data: Buffer.from("x") }], extra);
    await expect(restoreBackup(extra, { dataDir: path.join(scratch, "from-extra") })).rejects.toThrow(
      /unexpected entry/,
    );
    expect(fs.existsSync(path.join(scratch, "escape.txt"))).toBe(false);
  }, 120_000);
});

describe("PATCH /api/admin/settings", () => {
  const patch = (cookie: string | undefined, body: unknown) =>
    call(settingsRoute.PATCH, "/api/admin/settings", { method: "PATCH", cookie, body });
  const current = async () => (await (await getDb()).select().from(schema.clubSettings))[0]!;

  it("lets only admins change settings (401, 403), before reading the body", async () => {
    const was = await current();
    expect((await patch(undefined, { nightlyBackup: true })).status).toBe(401);
    for (const cookie of [member, moderator]) {
      const r = await patch(cookie, { nightlyBackup: "not even valid" });
      expect(r.status).toBe(403);
      expect(r.body.error.code).toBe("forbidden");
    }
    expect(await current()).toEqual(was);
  });

  it("refuses bad input with 422 or 400 naming what to fix, and changes nothing", async () => {
    const was = await current();
    const bad = await patch(admin, { nightlyBackup: "yes" });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues).toEqual([{ path: "nightlyBackup", message: "nightlyBackup must be true or false." }]);
    const unknown = await patch(admin, { nightlyBakup: true });
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.issues.map((i: { message: string }) => i.message).join(" ")).toMatch(/nightlyBakup/);
    expect((await patch(admin, {})).body.error.issues).toEqual([
      { path: "(body)", message: "Send at least one setting to change." },
    ]);
    expect((await patch(admin, { confidenceLevel: 97 })).body.error.issues[0]).toMatchObject({
      path: "confidenceLevel",
    });
    expect((await patch(admin, "{not json")).status).toBe(400);
    // JSON sends numbers as numbers: text that reads as one ("9e1", " 95 ") is refused, not guessed at.
    for (const [field, value] of [
      ["confidenceLevel", "9e1"],
      ["confidenceLevel", " 95 "],
      ["minReports", "5"],
      ["firstDoseFraction", "0.5"],
    ] as const) {
      const r = await patch(admin, { [field]: value });
      expect(r.status, `${field} ${value}`).toBe(422);
      expect(r.body.error.issues[0].path).toBe(field);
    }
    expect(await current()).toEqual(was);
  });

  it("turns the nightly backup on, records the change, and leaves the other settings alone", async () => {
    const was = await current();
    const r = await patch(admin, { nightlyBackup: true });
    expect(r.status).toBe(200);
    expect(r.body.settings).toMatchObject({
      nightlyBackup: true,
      name: was.name,
      confidenceLevel: was.confidenceLevel,
      minReports: was.minReports,
    });
    const [change] = await (
      await getDb()
    )
      .select()
      .from(schema.catalogueChanges)
      .where(eq(schema.catalogueChanges.entity, "club_settings"))
      .orderBy(desc(schema.catalogueChanges.id))
      .limit(1);
    expect(change).toMatchObject({
      entityKey: "1",
      action: "update",
      before: expect.objectContaining({ nightlyBackup: false }),
      after: { nightlyBackup: true },
    });
    const off = await patch(admin, { nightlyBackup: false });
    expect(off.body.settings.nightlyBackup).toBe(false);
  });
});

describe("nightly backup", () => {
  it("runs once a night when the setting is on, whatever the restarts, and keeps the last 7", async () => {
    const db = await getDb();
    const dir = path.join(dataDir(), "backups");
    const night = new Date(2026, 11, 3, 3, 30);
    await db
      .update(schema.clubSettings)
      .set({ nightlyBackup: false, lastNightlyBackupAt: null })
      .where(eq(schema.clubSettings.id, 1));
    expect(await runNightlyBackupIfDue(night)).toBeNull();

    await db.update(schema.clubSettings).set({ nightlyBackup: true }).where(eq(schema.clubSettings.id, 1));
    // Eight older archives from earlier nights (names sort by time): after tonight's run, the newest 7 remain.
    fs.mkdirSync(dir, { recursive: true });
    const older = Array.from({ length: 8 }, (_, i) => `tanklore-backup-2026-11-2${i}T03-00-00-000Z.tar.gz`);
    for (const n of older) fs.writeFileSync(path.join(dir, n), "old");
    const first = await runNightlyBackupIfDue(night);
    expect(first).not.toBeNull();
    const kept = fs.readdirSync(dir).sort();
    expect(kept).toHaveLength(7);
    expect(kept).toContain(path.basename(first!.file));
    expect(kept).not.toContain(older[0]);
    expect(kept).not.toContain(older[1]);

    // The claim lives in the database: a later tick the same night (or a restarted process) does nothing.
    expect(await runNightlyBackupIfDue(new Date(2026, 11, 3, 4, 10))).toBeNull();
    expect(await runNightlyBackupIfDue(new Date(2026, 11, 4, 2, 59))).toBeNull();
    const [row] = await db
      .select()
      .from(schema.clubSettings)
      .where(and(eq(schema.clubSettings.id, 1)));
    expect(row!.lastNightlyBackupAt?.getTime()).toBe(night.getTime());
    await db.update(schema.clubSettings).set({ nightlyBackup: false }).where(eq(schema.clubSettings.id, 1));
  }, 240_000);

  it("prunes only its own archives", async () => {
    const dir = path.join(scratch, "prune");
    fs.mkdirSync(dir);
    const names = Array.from({ length: 9 }, (_, i) => `tanklore-backup-2026-10-0${i + 1}T03-00-00-000Z.tar.gz`);
    for (const n of [...names, "keep-me.txt"]) fs.writeFileSync(path.join(dir, n), "x");
    expect((await pruneBackups(dir, 7)).sort()).toEqual(names.slice(0, 2));
    expect(fs.readdirSync(dir).sort()).toEqual([...names.slice(2), "keep-me.txt"].sort());
  });
});
