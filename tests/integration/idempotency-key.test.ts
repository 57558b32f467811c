import { beforeAll, describe, expect, it } from "vitest";
import sharp from "sharp";
import { count, eq, sql } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { BASE, call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

let alice: Awaited<ReturnType<typeof signedInUser>>;
let bruno: Awaited<ReturnType<typeof signedInUser>>;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  alice = await signedInUser("member");
  bruno = await signedInUser("member");
});

async function reportsOf(authorId: string) {
  const db = await getDb();
  const [r] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.authorId, authorId));
  return r!.n;
}

function post(cookie: string, key: string | null, body = reportBody({ submit: true })) {
  return call(reportsRoute.POST, "/api/reports", {
    cookie,
    body,
    headers: key === null ? {} : { "idempotency-key": key },
  });
}

function upload(reportId: string, data: Buffer, key: string, cookie = alice.cookie) {
  const form = new FormData();
  form.set("file", new Blob([new Uint8Array(data)], { type: "image/jpeg" }), "tank.jpg");
  form.set("stage", "before");
  const req = new Request(`${BASE}/api/reports/${reportId}/photos`, {
    method: "POST",
    body: form,
    headers: { cookie, origin: BASE, "idempotency-key": key },
  });
  return photosRoute.POST(req, { params: Promise.resolve({ id: reportId }) });
}

describe("Idempotency-Key on creating requests", () => {
  it("answers a repeat of the same key with the original response and creates one report", async () => {
    const before = await reportsOf(alice.id);
    const first = await post(alice.cookie, "retry-1");
    const again = await post(alice.cookie, "retry-1");
    expect(first.status).toBe(201);
    expect(again.status).toBe(201);
    expect(again.body).toEqual(first.body);
    expect(again.res.headers.get("idempotent-replayed")).toBe("true");
    expect(await reportsOf(alice.id)).toBe(before + 1);
    // Without a key, the same body is a new report each time.
    await post(alice.cookie, null);
    await post(alice.cookie, null);
    expect(await reportsOf(alice.id)).toBe(before + 3);
  });

  it("creates one report when the same key arrives several times at once", async () => {
    const before = await reportsOf(alice.id);
    const answers = await Promise.all(Array.from({ length: 6 }, () => post(alice.cookie, "parallel-1")));
    expect(answers.map((a) => a.status)).toEqual(Array(6).fill(201));
    expect(new Set(answers.map((a) => a.body.id)).size).toBe(1);
    expect(await reportsOf(alice.id)).toBe(before + 1);
  });

  it("keeps another member's use of the same key apart", async () => {
    const a = await post(alice.cookie, "shared-key");
    const b = await post(bruno.cookie, "shared-key");
    expect([a.status, b.status]).toEqual([201, 201]);
    expect(b.body.id).not.toBe(a.body.id);
    expect(await reportsOf(bruno.id)).toBe(1);
  });

  it("refuses the same key with a different body (422) and creates nothing", async () => {
    await post(alice.cookie, "changed-body");
    const before = await reportsOf(alice.id);
    const r = await post(alice.cookie, "changed-body", reportBody({ submit: true, fishCount: 7 }));
    expect(r.status).toBe(422);
    expect(r.body.error.issues[0].path).toBe("Idempotency-Key");
    expect(await reportsOf(alice.id)).toBe(before);
  });

  it("refuses a malformed key with 422 and creates nothing", async () => {
    const before = await reportsOf(alice.id);
    const r = await post(alice.cookie, "x".repeat(256));
    expect(r.status).toBe(422);
    expect(await reportsOf(alice.id)).toBe(before);
  });

  it("stores nothing for a request that failed, so a corrected retry with the key goes through", async () => {
    const bad = await post(alice.cookie, "after-failure", reportBody({ fishCount: -1 }));
    expect(bad.status).toBe(422);
    const good = await post(alice.cookie, "after-failure");
    expect(good.status).toBe(201);
  });

  it("treats a key older than 24 hours as new", async () => {
    const first = await post(alice.cookie, "yesterday");
    const db = await getDb();
    await db.execute(sql`update idempotency_keys set created_at = now() - interval '25 hours' where key = 'yesterday'`);
    const again = await post(alice.cookie, "yesterday");
    expect(again.status).toBe(201);
    expect(again.body.id).not.toBe(first.body.id);
  });

  it("answers a repeated photo upload with the first photo and stores one", async () => {
    const draft = await post(alice.cookie, null, reportBody());
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 20, g: 90, b: 120 } } })
      .jpeg()
      .toBuffer();
    const answers = await Promise.all([upload(draft.body.id, jpeg, "photo-1"), upload(draft.body.id, jpeg, "photo-1")]);
    const third = await upload(draft.body.id, jpeg, "photo-1");
    const bodies = await Promise.all([...answers, third].map((a) => a.json()));
    expect([...answers, third].map((a) => a.status)).toEqual([201, 201, 201]);
    expect(new Set(bodies.map((b) => b.id)).size).toBe(1);
    const db = await getDb();
    const [photos] = await db
      .select({ n: count() })
      .from(schema.photos)
      .where(eq(schema.photos.reportId, draft.body.id));
    expect(photos!.n).toBe(1);
  });
});
