import { beforeAll, describe, expect, it } from "vitest";
import sharp from "sharp";
import * as reportsRoute from "@/app/api/reports/route";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import * as photoRoute from "@/app/api/photos/[id]/route";
import * as entriesRoute from "@/app/api/reports/[id]/entries/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { runDueReminders } from "@/features/reports/server";
import { BASE, call } from "../support/http";
import { mailTo, reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let owner: U, other: U, moderator: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  owner = await signedInUser("member");
  other = await signedInUser("member");
  moderator = await signedInUser("moderator");
});

async function newDraft(): Promise<string> {
  const r = await call(reportsRoute.POST, "/api/reports", { body: reportBody(), cookie: owner.cookie });
  return r.body.id;
}

function upload(id: string, data: Buffer, name: string, cookie = owner.cookie, type = "image/jpeg") {
  const form = new FormData();
  form.set("file", new Blob([new Uint8Array(data)], { type }), name);
  form.set("stage", "before");
  const req = new Request(`${BASE}/api/reports/${id}/photos`, {
    method: "POST",
    body: form,
    headers: { cookie, origin: BASE },
  });
  return photosRoute.POST(req, { params: Promise.resolve({ id }) });
}

/** A real JPEG carrying EXIF with GPS coordinates (sharp writes IFD3 = the GPS IFD). */
async function jpegWithGps(): Promise<Buffer> {
  return sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 30, g: 110, b: 90 } } })
    .jpeg()
    .withExif({
      IFD0: { Make: "TestCam", Copyright: "nobody" },
      IFD3: { GPSLatitudeRef: "N", GPSLatitude: "51/1 30/1 0/1", GPSLongitudeRef: "W", GPSLongitude: "0/1 7/1 0/1" },
    })
    .toBuffer();
}

describe("photos", () => {
  it("serves an uploaded JPEG back with no EXIF at all, GPS included", async () => {
    const id = await newDraft();
    const original = await jpegWithGps();
    const meta = await sharp(original).metadata();
    expect(meta.exif?.toString("latin1")).toContain("TestCam");

    const res = await upload(id, original, "tank.jpg");
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ id: expect.any(String), width: 640, height: 480, bytes: expect.any(Number) });

    for (const size of ["full", "thumb"]) {
      const got = await call(photoRoute.GET, `/api/photos/${body.id}?size=${size}`, {
        params: { id: body.id },
        cookie: owner.cookie,
      });
      expect(got.status).toBe(200);
      const bytes = Buffer.from(
        await (
          await photoRoute.GET(
            new Request(`${BASE}/api/photos/${body.id}?size=${size}`, { headers: { cookie: owner.cookie } }),
            { params: Promise.resolve({ id: body.id }) },
          )
        ).arrayBuffer(),
      );
      const m = await sharp(bytes).metadata();
      expect(m.format).toBe("jpeg");
      expect(m.exif).toBeUndefined();
      expect(m.icc).toBeUndefined();
      expect(m.xmp).toBeUndefined();
      expect(bytes.includes(Buffer.from("TestCam"))).toBe(false);
    }
    const thumb = Buffer.from(
      await (
        await photoRoute.GET(
          new Request(`${BASE}/api/photos/${body.id}?size=thumb`, { headers: { cookie: owner.cookie } }),
          { params: Promise.resolve({ id: body.id }) },
        )
      ).arrayBuffer(),
    );
    expect((await sharp(thumb).metadata()).width).toBe(320);
  });

  it("refuses a text file named .jpg with 415, and HEIC with a sentence on converting it", async () => {
    const id = await newDraft();
    const text = await upload(id, Buffer.from("this is not a picture, just words\n".repeat(20)), "fish.jpg");
    expect(text.status).toBe(415);
    expect((await text.json()).error).toMatchObject({
      code: "unsupported_type",
      message: expect.stringMatching(/not a JPEG, PNG, WebP or AVIF/),
    });
    const heicHeader = Buffer.concat([
      Buffer.from([0, 0, 0, 0x18]),
      Buffer.from("ftypheic\0\0\0\0mif1heic"),
      Buffer.alloc(64),
    ]);
    const heic = await upload(id, heicHeader, "IMG_0001.HEIC", owner.cookie, "image/heic");
    expect(heic.status).toBe(415);
    expect((await heic.json()).error.message).toMatch(/HEIC.*JPEG/);
    const svg = await upload(id, Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"></svg>'), "a.png");
    expect(svg.status).toBe(415);
  });

  it("refuses an image over 40 megapixels with 413, and a file over 10 MB", async () => {
    const id = await newDraft();
    // 7000 × 6000 = 42 MP; a flat colour compresses to a small PNG.
    const big = await sharp({ create: { width: 7000, height: 6000, channels: 3, background: "#336655" } })
      .png()
      .toBuffer();
    const r = await upload(id, big, "big.png", owner.cookie, "image/png");
    expect(r.status).toBe(413);
    expect((await r.json()).error.message).toMatch(/42 megapixels; the limit is 40/);
    const huge = Buffer.concat([await jpegWithGps(), Buffer.alloc(11 * 1024 * 1024)]);
    expect((await upload(id, huge, "huge.jpg")).status).toBe(413);
  });

  it("keeps photos from anyone who may not see the report", async () => {
    const id = await newDraft();
    const res = await upload(id, await jpegWithGps(), "t.jpg");
    const photo = await res.json();
    expect((await upload(id, await jpegWithGps(), "t.jpg", other.cookie)).status).toBe(404);
    const asOther = await call(photoRoute.GET, `/api/photos/${photo.id}`, {
      params: { id: photo.id },
      cookie: other.cookie,
    });
    expect(asOther.status).toBe(404);
    const asModOnDraft = await call(photoRoute.GET, `/api/photos/${photo.id}`, {
      params: { id: photo.id },
      cookie: moderator.cookie,
    });
    expect(asModOnDraft.status).toBe(404);
    expect((await call(photoRoute.GET, `/api/photos/${photo.id}`, { params: { id: photo.id } })).status).toBe(401);
    const del = await call(photoRoute.DELETE, `/api/photos/${photo.id}`, {
      params: { id: photo.id },
      cookie: other.cookie,
      method: "DELETE",
    });
    expect(del.status).toBe(404);
  });

  it("answers 20 parallel 10 MB uploads without a 500 and without unbounded memory", async () => {
    const ids = [await newDraft(), await newDraft()];
    const jpeg = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: "#224433" } })
      .jpeg()
      .toBuffer();
    // A valid JPEG followed by padding up to just under 10 MB: the decoder stops at the end marker.
    const tenMb = Buffer.concat([jpeg, Buffer.alloc(10 * 1024 * 1024 - jpeg.length - 1024)]);
    global.gc?.();
    const before = process.memoryUsage().rss;
    let peak = before;
    const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 20);
    const results = await Promise.all(Array.from({ length: 20 }, (_, i) => upload(ids[i % 2]!, tenMb, `p${i}.jpg`)));
    clearInterval(timer);
    const statuses = results.map((r) => r.status);
    expect(statuses).toEqual(Array(20).fill(201));
    // 20 bodies of 10 MB are 200 MB in flight at most; decoding is limited to two at a time.
    expect((peak - before) / 1024 / 1024).toBeLessThan(700);
  });
});

describe("the treatment course log", () => {
  it("logs doses, updates the report from the log, and mails a reminder when the next dose falls due", async () => {
    const d = await call(draftsRoute.POST, "/api/reports/drafts", {
      cookie: owner.cookie,
      body: {
        courseOpen: true,
        speciesId: "carassius-auratus",
        fishCount: 3,
        water: { volume: 60, volumeUnit: "L" },
        treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, intervalHours: 48 },
      },
    });
    const id = d.body.id as string;
    const t0 = new Date(Date.now() - 60_000);
    const e1 = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "dose", at: t0.toISOString(), amountMl: 30 },
    });
    expect(e1.status).toBe(201);
    const bad = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "dose", at: t0.toISOString() },
    });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues[0].path).toBe("amountMl");
    const byOther = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: other.cookie,
      body: { kind: "observation", at: t0.toISOString(), text: "hi" },
    });
    expect(byOther.status).toBe(404);
    await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "observation", at: new Date().toISOString(), text: "Fish gasping briefly, then calm." },
    });

    const got = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie });
    expect(got.body.treatment).toMatchObject({ doses: 1, amountMl: 30 });
    expect(got.body.concentration).toBeCloseTo(15, 9); // 30 mL × 30 mg/mL / 60 L
    expect(got.body.courseEntries.map((e: { kind: string }) => e.kind)).toEqual(["dose", "observation"]);

    expect(await runDueReminders(new Date(t0.getTime() + 47 * 3600_000))).toBe(0);
    expect(await runDueReminders(new Date(t0.getTime() + 49 * 3600_000))).toBe(1);
    expect(await runDueReminders(new Date(t0.getTime() + 49 * 3600_000))).toBe(0); // sent once only
    const mail = mailTo(owner.email).filter((m) => /Subject: Tanklore: Next dose due/.test(m));
    expect(mail).toHaveLength(1);
    expect(mail[0]).toContain(`/reports/${id}`);
    expect(await runDueReminders(new Date(t0.getTime() + 8 * 24 * 3600_000))).toBe(1);
    expect(mailTo(owner.email).some((m) => /Time to record the outcome/.test(m))).toBe(true);
  });

  it("attaches a photo of the report to an observation, and refuses one of another report", async () => {
    const d = await call(draftsRoute.POST, "/api/reports/drafts", {
      cookie: owner.cookie,
      body: { courseOpen: true, fishCount: 2 },
    });
    const id = d.body.id as string;
    const photo = await (await upload(id, await jpegWithGps(), "gill.jpg")).json();
    const ok = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "observation", at: new Date().toISOString(), text: "Pale gills.", photoId: photo.id },
    });
    expect(ok.status).toBe(201);
    expect(ok.body.photoId).toBe(photo.id);
    const elsewhere = await newDraft();
    const foreign = await call(entriesRoute.POST, `/api/reports/${elsewhere}/entries`, {
      params: { id: elsewhere },
      cookie: owner.cookie,
      body: { kind: "observation", at: new Date().toISOString(), text: "x", photoId: photo.id },
    });
    expect(foreign.status).toBe(422);
    expect(foreign.body.error.issues[0].path).toBe("photoId");
  });
});
