import { beforeAll, describe, expect, it } from "vitest";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as entriesRoute from "@/app/api/reports/[id]/entries/route";
import * as entryRoute from "@/app/api/reports/[id]/entries/[entryId]/route";
import * as historyRoute from "@/app/api/reports/[id]/history/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { drainEvidenceOutbox, groupSummary } from "@/features/evidence/server";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { getCourse } from "@/features/reports/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let owner: U, other: U;
const HOUR = 3600_000;
const actorOf = (u: U) => ({ id: u.id, name: u.name, email: u.email, role: "member" as const });

beforeAll(async () => {
  await seedCatalogue(await getDb());
  owner = await signedInUser("member");
  other = await signedInUser("member");
});

/** An open course: 3 % w/v peroxide in 40 L, planned at 25 mg/L, a dose every 48 h. */
async function openCourse(extra: Record<string, unknown> = {}): Promise<string> {
  const d = await call(draftsRoute.POST, "/api/reports/drafts", {
    cookie: owner.cookie,
    body: {
      ...extra,
      courseOpen: true,
      speciesId: "paracheirodon-innesi",
      fishCount: 6,
      water: { volume: 40, volumeUnit: "L" },
      treatment: {
        agentSlug: "hydrogen-peroxide",
        stockPercent: 3,
        stockBasis: "w/v",
        statedConcentration: 25,
        intervalHours: 48,
      },
    },
  });
  expect(d.status).toBe(201);
  return d.body.id as string;
}

const logDose = (id: string, at: Date, amountMl: number, extra: Record<string, unknown> = {}) =>
  call(entriesRoute.POST, `/api/reports/${id}/entries`, {
    params: { id },
    cookie: owner.cookie,
    body: { kind: "dose", at: at.toISOString(), amountMl, ...extra },
  });
const patch = (id: string, entryId: number | string, body: unknown, cookie: string | null = owner.cookie) =>
  call(entryRoute.PATCH, `/api/reports/${id}/entries/${entryId}`, {
    method: "PATCH",
    params: { id, entryId: String(entryId) },
    cookie: cookie ?? undefined,
    body,
  });

describe("the next dose of an open course", () => {
  it("gives the time, mL and mg/L of the next dose, checked against a hand computation", async () => {
    const id = await openCourse();
    // Hand computation (worked by hand; % w/v = g per 100 mL, the textbook definition):
    // 3 % w/v = 3 g / 100 mL = 30 mg/mL; 25 mg/L × 40 L = 1000 mg; 1000 mg ÷ 30 mg/mL = 33.33 mL.
    const before = await getCourse(actorOf(owner), id);
    expect(before.stockMgPerMl).toBeCloseTo(30, 9);
    expect(before.plannedDoseMl).toBeCloseTo(33.333, 2);
    expect(before.nextDose).toMatchObject({ first: true, unit: "mg/L" });
    expect(before.nextDose!.doseMl).toBeCloseTo(33.333, 2);
    expect(before.nextDose!.concentration).toBeCloseTo(25, 9);
    expect(before.watchFor.length).toBeGreaterThan(0);

    const t0 = new Date(Date.now() - 2 * HOUR);
    expect((await logDose(id, t0, 33.3)).status).toBe(201);
    const after = await getCourse(actorOf(owner), id);
    // The next dose repeats the last: 33.3 mL × 30 mg/mL ÷ 40 L = 24.975 mg/L, 48 h after t0.
    expect(after.nextDose!.at).toBe(new Date(t0.getTime() + 48 * HOUR).toISOString());
    expect(after.nextDose!.doseMl).toBe(33.3);
    expect(after.nextDose!.concentration).toBeCloseTo(24.975, 9);
    expect(after.entries[0]!.concentration).toBeCloseTo(24.975, 9);
  });
});

describe("entry times", () => {
  it("refuses a dose dated before the course started, and changes nothing", async () => {
    const id = await openCourse({ startedOn: "2026-11-20" });
    const early = await logDose(id, new Date("1970-01-01T00:00:00Z"), 10);
    expect(early.status).toBe(422);
    expect(early.body.error.issues).toEqual([
      { path: "at", message: "This time is before the course started (20 Nov 2026); check the date." },
    ]);
    // A day's grace for time zones ahead of UTC: the evening before, UTC, is the morning of the 20th in the Pacific.
    expect((await logDose(id, new Date("2026-11-19T20:00:00Z"), 10)).status).toBe(201);
    const course = await getCourse(actorOf(owner), id);
    expect(course.entries).toHaveLength(1);
  });
});

describe("correcting and striking out course entries", () => {
  it("corrects a typo'd amount only with confirmation when over 3× the plan, and keeps the change in the history", async () => {
    const id = await openCourse();
    const t0 = new Date(Date.now() - 3 * HOUR);
    // 10,000 mL against a planned 33.33 mL: refused until confirmed.
    const typo = await logDose(id, t0, 10_000);
    expect(typo.status).toBe(422);
    expect(typo.body.error.issues[0]).toMatchObject({
      path: "amountMl",
      message: expect.stringMatching(/more than 3× the planned dose.*confirm: true/),
    });
    const confirmed = await logDose(id, t0, 10_000, { confirm: true });
    expect(confirmed.status).toBe(201);
    const entryId = confirmed.body.id as number;

    const tooMuch = await patch(id, entryId, { amountMl: 101 });
    expect(tooMuch.status).toBe(422);
    expect(tooMuch.body.error.issues[0].path).toBe("amountMl");
    const fixed = await patch(id, entryId, { amountMl: 33, note: "Typed an extra zero or three." });
    expect(fixed.status).toBe(200);
    expect(fixed.body).toMatchObject({ id: entryId, amountMl: 33, struckAt: null });

    const report = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie });
    expect(report.body.treatment).toMatchObject({ doses: 1, amountMl: 33 });
    expect(report.body.concentration).toBeCloseTo((33 * 30) / 40, 9);
    const history = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: owner.cookie,
    });
    const corrected = history.body.events.find((e: { action: string }) => e.action === "entry_corrected");
    expect(corrected.note).toMatch(/amount 10000 mL → 33 mL.*Typed an extra zero/);
  });

  it("asks for confirmation of a time in the future, naming the field", async () => {
    const id = await openCourse();
    const e = await logDose(id, new Date(Date.now() - HOUR), 30);
    const future = new Date(Date.now() + 5 * 24 * HOUR).toISOString();
    const refused = await patch(id, e.body.id, { at: future });
    expect(refused.status).toBe(422);
    expect(refused.body.error.issues[0]).toMatchObject({
      path: "at",
      message: expect.stringMatching(/future.*confirm: true/),
    });
    const unchanged = await getCourse(actorOf(owner), id);
    expect(unchanged.entries[0]!.at).toBe(e.body.at);
    const ok = await patch(id, e.body.id, { at: future, confirm: true });
    expect(ok.status).toBe(200);
    expect(ok.body.at).toBe(future);
  });

  it("strikes an entry out without deleting it: it stays in the log, stops counting, and the history says so", async () => {
    const id = await openCourse();
    const a = await logDose(id, new Date(Date.now() - 50 * HOUR), 33);
    const b = await logDose(id, new Date(Date.now() - 2 * HOUR), 30);
    const struck = await patch(id, b.body.id, { struck: true, note: "Logged twice." });
    expect(struck.status).toBe(200);
    expect(struck.body.struckAt).toEqual(expect.any(String));

    const course = await getCourse(actorOf(owner), id);
    expect(course.entries.map((e) => e.id)).toEqual([a.body.id, b.body.id]);
    // The next dose now follows the one remaining dose, 48 h after it.
    expect(course.nextDose!.at).toBe(new Date(Date.parse(a.body.at) + 48 * HOUR).toISOString());
    const report = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie });
    expect(report.body.treatment).toMatchObject({ doses: 1, amountMl: 33 });

    const again = await patch(id, b.body.id, { amountMl: 31 });
    expect(again.status).toBe(409);
    const history = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: owner.cookie,
    });
    expect(history.body.events.find((e: { action: string }) => e.action === "entry_struck").note).toMatch(
      /struck out the dose of 30 mL.*Logged twice/,
    );
  });

  it("refuses bad requests in the envelope and changes nothing", async () => {
    const id = await openCourse();
    const e = await logDose(id, new Date(Date.now() - HOUR), 30);
    expect((await patch(id, e.body.id, {})).status).toBe(422);
    const both = await patch(id, e.body.id, { struck: true, amountMl: 20 });
    expect(both.status).toBe(422);
    expect(both.body.error.issues[0].path).toBe("struck");
    expect((await patch(id, e.body.id, { struck: false })).body.error.issues[0].path).toBe("struck");
    const note = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "observation", at: new Date().toISOString(), text: "Calm." },
    });
    expect((await patch(id, note.body.id, { text: "  " })).body.error.issues[0].path).toBe("text");
    expect((await patch(id, note.body.id, { amountMl: 3 })).body.error.issues[0].path).toBe("amountMl");
    expect((await patch(id, "not-a-number", { amountMl: 20 })).status).toBe(404);
    expect((await patch(id, 999_999, { amountMl: 20 })).status).toBe(404);
    expect((await getCourse(actorOf(owner), id)).entries[0]!.amountMl).toBe(30);
  });

  it("hides the entries from other members (404) and asks visitors to sign in (401)", async () => {
    const id = await openCourse();
    const e = await logDose(id, new Date(Date.now() - HOUR), 30);
    const byOther = await patch(id, e.body.id, { amountMl: 20 }, other.cookie);
    expect(byOther.status).toBe(404);
    expect(byOther.body.error.code).toBe("not_found");
    const byVisitor = await patch(id, e.body.id, { amountMl: 20 }, null);
    expect(byVisitor.status).toBe(401);
    expect((await getCourse(actorOf(owner), id)).entries[0]!.amountMl).toBe(30);
  });
});

describe("the course log's guard rails, shared with the planner", () => {
  let mod: U;
  /** An accepted peroxide report on `speciesId`, dosed by stated concentration so its dose is exactly `dose`. */
  async function accepted(speciesId: string, dose: number, adverse = false) {
    const body = reportBody({
      speciesId,
      treatment: { statedConcentration: dose, doses: 1 },
      outcome: {
        fishLost: adverse ? 2 : 0,
        lossCause: adverse ? "treatment" : null,
        distress: adverse ? "severe" : "mild",
        condition: "improved",
      },
      submit: true,
    });
    delete body.treatment.amountMl;
    delete body.treatment.intervalHours;
    const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: other.cookie });
    expect(r.status).toBe(201);
    const d = await call(decisionRoute.POST, `/api/reports/${r.body.id}/decision`, {
      params: { id: r.body.id },
      cookie: mod.cookie,
      body: { decision: "accept" },
    });
    expect(d.body.status).toBe("accepted");
  }

  beforeAll(async () => {
    mod = await signedInUser("moderator");
    // Corydoras: tolerated at 10, 15, 20, 25, 30 mg/L (highest 30); lost at 12 mg/L, the lowest adverse dose.
    for (const d of [10, 15, 20, 25, 30]) await accepted("corydoras-paleatus", d);
    await accepted("corydoras-aeneus", 12, true);
    await drainEvidenceOutbox();
  }, 120_000);

  /** 3 % w/v peroxide (30 mg/mL) in 40 L, planned at 10 mg/L = 13.33 mL: 1 mL makes 0.75 mg/L. */
  async function corydorasCourse(): Promise<string> {
    const d = await call(draftsRoute.POST, "/api/reports/drafts", {
      cookie: owner.cookie,
      body: {
        courseOpen: true,
        speciesId: "corydoras-paleatus",
        fishCount: 4,
        water: { volume: 40, volumeUnit: "L" },
        treatment: {
          agentSlug: "hydrogen-peroxide",
          stockPercent: 3,
          stockBasis: "w/v",
          statedConcentration: 10,
          intervalHours: 48,
        },
      },
    });
    expect(d.status).toBe(201);
    return d.body.id as string;
  }
  const codes = (issues: { code?: string }[]) => issues.map((i) => i.code).filter(Boolean);

  it("asks the keeper to acknowledge a dose at or above the group's lowest adverse dose, and keeps the acknowledgement", async () => {
    const id = await corydorasCourse();
    const at = new Date(Date.now() - HOUR);
    // 20 mL × 30 mg/mL ÷ 40 L = 15 mg/L (hand computation), at or above 12 mg/L; 20 mL is under 3× the planned 13.33 mL.
    const refused = await logDose(id, at, 20);
    expect(refused.status).toBe(422);
    expect(codes(refused.body.error.issues)).toEqual(["at_or_above_lowest_adverse"]);
    expect(refused.body.error.issues[0]).toMatchObject({
      path: "amountMl",
      message: expect.stringMatching(/12 mg\/L.*confirm: true/),
    });
    expect((await getCourse(actorOf(owner), id)).entries).toHaveLength(0);

    const confirmed = await logDose(id, at, 20, { confirm: true });
    expect(confirmed.status).toBe(201);
    const history = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: owner.cookie,
    });
    expect(history.body.events.find((e: { action: string }) => e.action === "dose_logged").note).toBe(
      "20 mL; warnings acknowledged: at or above the lowest dose that went badly",
    );

    // The log shows the warning on the entry; the next dose is not the confirmed 20 mL again but the plan's
    // 13.33 mL (10 mg/L, below the 12 mg/L lowest adverse dose), so it carries no warning.
    const course = await getCourse(actorOf(owner), id, { loadEvidence: groupSummary });
    expect(course.entries[0]!.warnings.map((w) => w.code)).toEqual(["at_or_above_lowest_adverse"]);
    expect(course.nextDose!.doseMl).toBeCloseTo(13.333, 3);
    expect(course.nextDose!.concentration).toBeCloseTo(10, 9);
    expect(course.nextDoseWarnings).toEqual([]);
  });

  it("logs a dose below every rail without asking", async () => {
    const id = await corydorasCourse();
    // 8 mL → 6 mg/L: below 12 (lowest adverse), 30 (highest tolerated) and 150 (ceiling).
    const ok = await logDose(id, new Date(Date.now() - HOUR), 8);
    expect(ok.status).toBe(201);
    const course = await getCourse(actorOf(owner), id, { loadEvidence: groupSummary });
    expect(course.entries[0]!.warnings).toEqual([]);
    expect(course.entries[0]!.concentration).toBeCloseTo(6, 12);
  });

  it("judges a correction the same way: above the highest tolerated dose and the plausible ceiling", async () => {
    const id = await corydorasCourse();
    const e = await logDose(id, new Date(Date.now() - HOUR), 8);
    // 45 mL → 33.75 mg/L: above 30 (highest tolerated) and over 3× the planned 13.33 mL.
    const refused = await patch(id, e.body.id, { amountMl: 45 });
    expect(refused.status).toBe(422);
    expect(refused.body.error.issues[0].message).toMatch(/more than 3×/);
    expect(codes(refused.body.error.issues)).toEqual(["at_or_above_lowest_adverse", "above_highest_tolerated"]);
    // 250 mL → 187.5 mg/L: above peroxide's plausible ceiling of 150 mg/L (the catalogue's figure).
    const huge = await patch(id, e.body.id, { amountMl: 250 });
    expect(codes(huge.body.error.issues)).toContain("above_ceiling");
    expect((await getCourse(actorOf(owner), id)).entries[0]!.amountMl).toBe(8);
    const ok = await patch(id, e.body.id, { amountMl: 45, confirm: true, note: "Measured twice." });
    expect(ok.status).toBe(200);
    const history = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: owner.cookie,
    });
    expect(history.body.events.find((ev: { action: string }) => ev.action === "entry_corrected").note).toMatch(
      /amount 8 mL → 45 mL; warnings acknowledged: at or above the lowest dose that went badly, above the highest dose tolerated — Measured twice\./,
    );
  });
});
