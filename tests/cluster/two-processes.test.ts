import sharp from "sharp";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startCluster, type Cluster } from "@/db/cluster";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";
import { S3ObjectStorage } from "@/features/shared/server/object-storage";
import { getS3Env } from "@/features/shared/server/storage-env";
import { connect, http, person, reportBody, seed, signIn } from "./support";

// Two app processes (A and B, separate DATA_DIRs) on one PostgreSQL server and the S3 fake, as a club behind a
// proxy would run them. Everything goes through HTTP; the test's own database connection only seeds people.
let cluster: Cluster;
let db: Db;
let closeDb: () => Promise<void>;
let bucket: S3ObjectStorage;
const A = () => cluster.apps[0]!;
const B = () => cluster.apps[1]!;

beforeAll(async () => {
  cluster = await startCluster({ extraEnv: { TRUSTED_PROXY_HOPS: "1" } });
  ({ db, close: closeDb } = connect(cluster.pg.url));
  await seed(db);
  bucket = new S3ObjectStorage(getS3Env(cluster.s3.env)!);
});

afterAll(async () => {
  await closeDb?.();
  await cluster?.stop();
});

/** The digest mails in the bucket's outbox, by recipient. */
async function digestsTo(email: string): Promise<number> {
  let n = 0;
  for (const o of await bucket.list("mail/")) {
    const raw = (await bucket.get(o.key))!.toString("utf8");
    if (new RegExp(`^To: .*${email.replace(/[.+]/g, "\\$&")}`, "mi").test(raw) && /awaiting review/.test(raw)) n += 1;
  }
  return n;
}

describe("two processes on one database and one bucket", () => {
  it("accepts a session made through A on B", async () => {
    const m = await person(db, "member");
    const cookie = await signIn(A(), m.email);
    const onB = await http(B(), "/api/auth/get-session", { cookie });
    expect(onB.status).toBe(200);
    expect(onB.json?.user?.id).toBe(m.id);
  });

  it("serves through B a photo uploaded through A, kept in the bucket", async () => {
    const m = await person(db, "member");
    const cookie = await signIn(A(), m.email);
    const created = await http(A(), "/api/reports", { cookie, body: reportBody() });
    expect(created.status).toBe(201);
    const jpeg = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 30, g: 110, b: 90 } } })
      .jpeg()
      .toBuffer();
    const form = new FormData();
    form.set("file", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "tank.jpg");
    form.set("stage", "before");
    const up = await http(A(), `/api/reports/${created.json.id}/photos`, { cookie, form });
    expect(up.status).toBe(201);
    const fromB = await http(B(), `/api/photos/${up.json.id}?size=full`, { cookie });
    expect(fromB.status).toBe(200);
    expect((await sharp(fromB.buf).metadata()).format).toBe("jpeg");
    const stored = await bucket.get(`uploads/${created.json.id}/${up.json.id}-full.jpg`);
    expect(stored?.equals(fromB.buf)).toBe(true);
  });

  it("counts wrong passwords for one account sent alternately to A and B against one limit", async () => {
    const m = await person(db, "member");
    const statuses: number[] = [];
    for (let i = 0; i < 16; i++) {
      const app = i % 2 === 0 ? A() : B();
      statuses.push(
        (
          await http(app, "/api/auth/sign-in/email", {
            body: { email: m.email, password: "wrong-password-123" },
            from: "203.0.113.77",
          })
        ).status,
      );
    }
    // Eight attempts reached each process: below both limits (ten a minute per address, ten per account), so
    // the 429 comes only because the counts of A and B add up in the database.
    const first429 = statuses.indexOf(429);
    expect(first429).toBeGreaterThanOrEqual(10);
    expect(statuses.slice(0, 10).every((s) => s === 401)).toBe(true);
    const [row] = await db.select().from(schema.signInLimits).where(eq(schema.signInLimits.email, m.email));
    expect(row?.attempts).toBeGreaterThan(8);
  });

  it("sends each moderator one digest an hour, however many rounds A and B run at once", async () => {
    const member = await person(db, "member");
    const mods = [await person(db, "moderator"), await person(db, "moderator")];
    const admin = await person(db, "admin");
    const memberCookie = await signIn(A(), member.email);
    const adminCookie = await signIn(B(), admin.email);
    const submitted = await http(A(), "/api/reports", { cookie: memberCookie, body: reportBody({ submit: true }) });
    expect(submitted.json?.status).toBe("awaiting_review");
    const round = () =>
      Promise.all(
        [A(), B(), A(), B(), A(), B()].map((app) =>
          http(app, "/api/admin/jobs", { cookie: adminCookie, body: { run: "moderator-digest" } }),
        ),
      );
    for (const r of await round()) expect(r.status).toBe(200);
    for (const mod of [...mods, admin]) expect(await digestsTo(mod.email)).toBe(1);
    // A second report within the hour waits for the next digest.
    await http(B(), "/api/reports", { cookie: memberCookie, body: reportBody({ submit: true }) });
    await round();
    for (const mod of [...mods, admin]) expect(await digestsTo(mod.email)).toBe(1);
    const jobs = await http(A(), "/api/admin/jobs", { cookie: adminCookie });
    expect(jobs.status).toBe(200);
    expect(jobs.json.rounds.map((r: { kind: string }) => r.kind).sort()).toEqual([
      "moderator-digest",
      "nightly-backup",
      "reminders",
    ]);
  });

  it("shows an accept made through A in B's summaries within 2 s", async () => {
    const member = await person(db, "member");
    const mod = await person(db, "moderator");
    const memberCookie = await signIn(B(), member.email);
    const modCookie = await signIn(A(), mod.email);
    const reportsOf = async () => {
      const r = await http(B(), "/api/summaries?agent=hydrogen-peroxide");
      return (r.json?.groups ?? []).reduce((n: number, g: { reports: number }) => n + g.reports, 0) as number;
    };
    const before = await reportsOf();
    const sub = await http(B(), "/api/reports", { cookie: memberCookie, body: reportBody({ submit: true }) });
    const decided = await http(A(), `/api/reports/${sub.json.id}/decision`, {
      cookie: modCookie,
      body: { decision: "accept", note: "" },
    });
    expect(decided.json?.status).toBe("accepted");
    const t0 = Date.now();
    let after = before;
    while (Date.now() - t0 < 2_000 && after === before) {
      await new Promise((r) => setTimeout(r, 100));
      after = await reportsOf();
    }
    expect(after).toBe(before + 1);
  });
});
