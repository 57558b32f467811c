import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as submitRoute from "@/app/api/reports/[id]/submit/route";
import * as historyRoute from "@/app/api/reports/[id]/history/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let owner: U, other: U, moderator: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  owner = await signedInUser("member", "Owen Owner");
  other = await signedInUser("member", "Olga Other");
  moderator = await signedInUser("moderator", "Mina Moderator");
});

const create = (body: unknown, cookie = owner.cookie) => call(reportsRoute.POST, "/api/reports", { body, cookie });
const reportCount = async () => (await (await getDb()).select({ n: count() }).from(schema.reports))[0]!.n;

describe("POST /api/reports", () => {
  it("answers 201 with the id, status and the computed peak concentration", async () => {
    const r = await create(reportBody());
    expect(r.status).toBe(201);
    // 40 mL × 30 mg/mL (3 % w/v) / 40 L = 30 mg/L.
    expect(r.body).toEqual({ id: expect.any(String), status: "draft", concentration: 30 });
    const sub = await create(reportBody({ submit: true, water: { volume: 10, volumeUnit: "gal_us" } }));
    expect(sub.body.status).toBe("awaiting_review");
    // 40 mL × 30 mg/mL / (10 × 3.785411784 L) (NIST SP 811 gallon) = 31.70 mg/L.
    expect(sub.body.concentration).toBeCloseTo(1200 / 37.85411784, 9);
  });

  it("uses the stated concentration where no amount was given", async () => {
    const body = reportBody();
    delete body.treatment.amountMl;
    body.treatment.statedConcentration = 25;
    const r = await create(body);
    expect(r.body.concentration).toBe(25);
  });

  it("answers 422 naming the field for each invalid body, and stores nothing", async () => {
    const before = await reportCount();
    const noAgent = reportBody();
    delete noAgent.treatment.agentSlug;
    const cases: [unknown, string][] = [
      [reportBody({ fishCount: 3, outcome: { fishLost: 5, lossCause: "treatment" } }), "outcome.fishLost"],
      [noAgent, "treatment.agentSlug"],
      [reportBody({ startedOn: "2099-01-01" }), "startedOn"],
      [reportBody({ speciesId: "no-such-fish" }), "speciesId"],
      [reportBody({ water: { volume: -10 } }), "water.volume"],
      // Under 100 mL: 1e-300 L was stored and made a 3e303 mg/L report that an override could put in the evidence.
      [reportBody({ water: { volume: 1e-300 } }), "water.volume"],
      [reportBody({ water: { volume: 90, volumeUnit: "mL" } }), "water.volume"],
      [reportBody({ outcome: { fishLost: 2, lossCause: null } }), "outcome.lossCause"],
      [reportBody({ treatment: { doses: 2, intervalHours: undefined } }), "treatment.intervalHours"],
      [reportBody({ speciesId: null }), "speciesOther"],
      [reportBody({ conditionSlug: "gremlins" }), "conditionSlug"],
      [reportBody({ treatment: { agentSlug: "snake-oil" } }), "treatment.agentSlug"],
      [reportBody({ water: { temperature: 80 } }), "water.temperature"],
      [reportBody({ treatment: { stockPercent: 8, stockBasis: "w/w" } }), "treatment.stockDensityGPerMl"],
    ];
    for (const [body, path] of cases) {
      const r = await create(body);
      expect(r.status, path).toBe(422);
      expect(r.body.error.code).toBe("invalid");
      expect(
        r.body.error.issues.map((i: { path: string }) => i.path),
        path,
      ).toContain(path);
    }
    expect(await reportCount()).toBe(before);
  });

  it("refuses a visitor with 401", async () => {
    const r = await call(reportsRoute.POST, "/api/reports", { body: reportBody() });
    expect(r.status).toBe(401);
  });
});

describe("who may see and change a report", () => {
  it("hides a draft from another member (404) and a visitor (401), lets the owner do everything", async () => {
    const { body } = await create(reportBody());
    const id = body.id as string;
    const as = (cookie?: string) => ({ params: { id }, cookie });

    expect((await call(reportRoute.GET, `/api/reports/${id}`, as(owner.cookie))).status).toBe(200);
    expect((await call(reportRoute.GET, `/api/reports/${id}`, as())).status).toBe(401);
    const peek = await call(reportRoute.GET, `/api/reports/${id}`, as(other.cookie));
    expect(peek.status).toBe(404);
    expect(peek.body.error.code).toBe("not_found");
    // A draft is private even from moderators until it is submitted.
    expect((await call(reportRoute.GET, `/api/reports/${id}`, as(moderator.cookie))).status).toBe(404);
    expect((await call(historyRoute.GET, `/api/reports/${id}/history`, as(other.cookie))).status).toBe(404);

    const patchByOther = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      ...as(other.cookie),
      method: "PATCH",
      body: { fishCount: 1 },
    });
    expect(patchByOther.status).toBe(404);
    expect(
      (await call(reportRoute.DELETE, `/api/reports/${id}`, { ...as(other.cookie), method: "DELETE" })).status,
    ).toBe(404);
    expect(
      (await call(submitRoute.POST, `/api/reports/${id}/submit`, { ...as(other.cookie), method: "POST" })).status,
    ).toBe(404);
    const still = await call(reportRoute.GET, `/api/reports/${id}`, as(owner.cookie));
    expect(still.body.fishCount).toBe(6);

    const del = await call(reportRoute.DELETE, `/api/reports/${id}`, { ...as(owner.cookie), method: "DELETE" });
    expect(del.status).toBe(200);
    expect((await call(reportRoute.GET, `/api/reports/${id}`, as(owner.cookie))).status).toBe(404);
  });

  it("lets moderators read a submitted report but not change it; the owner cannot delete it", async () => {
    const { body } = await create(reportBody({ submit: true }));
    const id = body.id as string;
    const mod = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: moderator.cookie });
    expect(mod.status).toBe(200);
    expect(mod.body.author.name).toBe("Owen Owner");
    const patch = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      params: { id },
      cookie: moderator.cookie,
      method: "PATCH",
      body: { fishCount: 2 },
    });
    expect(patch.status).toBe(403);
    const ownPatch = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      params: { id },
      cookie: owner.cookie,
      method: "PATCH",
      body: { fishCount: 2 },
    });
    expect(ownPatch.status).toBe(409);
    const del = await call(reportRoute.DELETE, `/api/reports/${id}`, {
      params: { id },
      cookie: owner.cookie,
      method: "DELETE",
    });
    expect(del.status).toBe(409);
    expect((await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: other.cookie })).status).toBe(
      404,
    );
  });
});

describe("drafts, edits and submission", () => {
  it("clears an optional answer sent as null, keeps one left out, and refuses null for a required one", async () => {
    const body = reportBody({ treatment: { statedConcentration: 10, otherTreatments: "salt earlier" } });
    const { body: made } = await create(body);
    const id = made.id as string;
    const patch = (b: unknown) =>
      call(reportRoute.PATCH, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie, method: "PATCH", body: b });
    const read = async () =>
      (await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie })).body;

    const cleared = await patch({
      water: { ph: null },
      treatment: { statedConcentration: null, otherTreatments: null },
      outcome: { notes: null },
    });
    expect(cleared.status).toBe(200);
    const after = await read();
    expect(after.water.ph ?? null).toBeNull();
    expect(after.treatment.statedConcentration ?? null).toBeNull();
    expect(after.treatment.otherTreatments ?? null).toBeNull();
    expect(after.outcome.notes ?? null).toBeNull();
    // Left out: unchanged. 40 mL × 30 mg/mL (3 % w/v) / 40 L = 30 mg/L, still computed from the amount.
    expect(after.treatment.amountMl).toBe(40);
    expect(after.concentration).toBe(30);

    // The strength of a given amount cannot be cleared, nor can a required answer; neither changes anything.
    const noStrength = await patch({ treatment: { stockPercent: null } });
    expect(noStrength.status).toBe(422);
    expect(noStrength.body.error.issues.map((i: { path: string }) => i.path)).toContain("treatment.stockPercent");
    const noVolume = await patch({ water: { volume: null } });
    expect(noVolume.status).toBe(422);
    expect(noVolume.body.error.issues.map((i: { path: string }) => i.path)).toContain("water.volume");
    expect((await read()).water.volume).toBe(40);
    expect((await read()).treatment.stockPercent).toBe(3);
  });

  it("saves a partial draft, merges nested edits, and on submit names what is missing", async () => {
    const d = await call(draftsRoute.POST, "/api/reports/drafts", {
      cookie: owner.cookie,
      body: { speciesId: "betta-splendens", fishCount: 1, water: { volume: 20, volumeUnit: "L" } },
    });
    expect(d.status).toBe(201);
    const id = d.body.id as string;
    const early = await call(submitRoute.POST, `/api/reports/${id}/submit`, {
      params: { id },
      cookie: owner.cookie,
      method: "POST",
    });
    expect(early.status).toBe(422);
    const missing = early.body.error.issues.map((i: { path: string }) => i.path);
    // No count of fish lost yet: the likely cause of losses is not asked before it.
    expect(missing).not.toContain("outcome.lossCause");
    expect(missing).toEqual(
      expect.arrayContaining([
        "sizeClass",
        "conditionSlug",
        "startedOn",
        "water.temperature",
        "treatment.agentSlug",
        "outcome.distress",
      ]),
    );

    const full = reportBody();
    const patch = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      params: { id },
      cookie: owner.cookie,
      method: "PATCH",
      body: {
        sizeClass: "adult",
        conditionSlug: "velvet",
        startedOn: "2026-10-01",
        water: { temperature: 80, temperatureUnit: "F", setting: "bare" },
        treatment: full.treatment,
        outcome: full.outcome,
      },
    });
    expect(patch.status).toBe(200);
    const got = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie });
    expect(got.body.water).toMatchObject({ volume: 20, volumeUnit: "L", temperature: 80, temperatureUnit: "F" });
    // (80 − 32) / 1.8 = 26.67 °C; 40 mL × 30 mg/mL / 20 L = 60 mg/L.
    expect(got.body.water.temperatureC).toBeCloseTo(26.6667, 3);
    expect(got.body.concentration).toBe(60);

    const badPatch = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      params: { id },
      cookie: owner.cookie,
      method: "PATCH",
      body: { outcome: { fishLost: 3 } },
    });
    expect(badPatch.status).toBe(422);
    expect(badPatch.body.error.issues[0].path).toBe("outcome.fishLost");

    const ok = await call(submitRoute.POST, `/api/reports/${id}/submit`, {
      params: { id },
      cookie: owner.cookie,
      method: "POST",
    });
    expect(ok.body).toEqual({ id, status: "awaiting_review" });
    const again = await call(submitRoute.POST, `/api/reports/${id}/submit`, {
      params: { id },
      cookie: owner.cookie,
      method: "POST",
    });
    expect(again.status).toBe(409);

    const history = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: owner.cookie,
    });
    expect(history.body.events.map((e: { action: string }) => e.action)).toEqual(["created", "submitted"]);
    expect(history.body.events[1]).toMatchObject({
      actor: { id: owner.id, name: "Owen Owner" },
      from: "draft",
      to: "awaiting_review",
    });
  });

  it("flags a stated concentration 30 % off the computed one when submitted", async () => {
    const r = await create(reportBody({ submit: true, treatment: { statedConcentration: 39 } }));
    const db = await getDb();
    const [row] = await db.select().from(schema.reports).where(eq(schema.reports.id, r.body.id));
    expect(row!.flags.map((f) => f.code)).toContain("stated_mismatch");
    expect(row!.flags.find((f) => f.code === "stated_mismatch")!.message).toMatch(/30 % above/);
    const close = await create(reportBody({ submit: true, treatment: { statedConcentration: 33 } }));
    const [row2] = await db.select().from(schema.reports).where(eq(schema.reports.id, close.body.id));
    expect(row2!.flags.map((f) => f.code)).not.toContain("stated_mismatch");
  });

  it("lists only the caller's reports, sorted and paged", async () => {
    const mine = await call(reportsRoute.GET, "/api/reports?scope=mine&sort=startedOn&dir=asc&pageSize=2", {
      cookie: owner.cookie,
    });
    expect(mine.status).toBe(200);
    expect(mine.body.reports).toHaveLength(2);
    expect(mine.body.total).toBeGreaterThan(2);
    const theirs = await call(reportsRoute.GET, "/api/reports?scope=mine", { cookie: other.cookie });
    expect(theirs.body.total).toBe(0);
    const bad = await call(reportsRoute.GET, "/api/reports?status=lost", { cookie: owner.cookie });
    expect(bad.status).toBe(422);
  });
});
