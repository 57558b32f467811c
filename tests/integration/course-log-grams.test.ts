import { beforeAll, describe, expect, it } from "vitest";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as entriesRoute from "@/app/api/reports/[id]/entries/route";
import * as entryRoute from "@/app/api/reports/[id]/entries/[entryId]/route";
import * as historyRoute from "@/app/api/reports/[id]/history/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { getCourse } from "@/features/reports/server";
import { call } from "../support/http";
import { signedInUser } from "../support/factories";

// Reference for every g/L figure below: a mass concentration is the mass of solute divided by the volume of the
// solution (ISO 80000-9; SI Brochure, 9th ed., 2019), so grams = g/L × litres. Worked by hand from that definition:
// 1.5 g/L in 40 L = 60 g; 3 g/L in 40 L = 120 g; 1500 g in 40 L = 37.5 g/L. Brine 10 % w/v = 10 g per 100 mL = 100 mg/mL
// (the textbook definition of % w/v), so 1200 mL of it holds 120 g.

type U = Awaited<ReturnType<typeof signedInUser>>;
let owner: U;
const HOUR = 3600_000;
const actorOf = (u: U) => ({ id: u.id, name: u.name, email: u.email, role: "member" as const });

beforeAll(async () => {
  await seedCatalogue(await getDb());
  owner = await signedInUser("member");
});

/** An open salt course in 40 L, planned at 1.5 g/L, a dose every 24 h: weighed dry unless a stock is given. */
async function saltCourse(treatment: Record<string, unknown> = {}): Promise<string> {
  const d = await call(draftsRoute.POST, "/api/reports/drafts", {
    cookie: owner.cookie,
    body: {
      courseOpen: true,
      speciesId: "paracheirodon-innesi",
      fishCount: 6,
      water: { volume: 40, volumeUnit: "L" },
      treatment: { agentSlug: "salt", statedConcentration: 1.5, intervalHours: 24, ...treatment },
    },
  });
  expect(d.status).toBe(201);
  return d.body.id as string;
}

const post = (id: string, body: Record<string, unknown>) =>
  call(entriesRoute.POST, `/api/reports/${id}/entries`, { params: { id }, cookie: owner.cookie, body });
const dose = (id: string, at: Date, amount: Record<string, unknown>) =>
  post(id, { kind: "dose", at: at.toISOString(), ...amount });
const patch = (id: string, entryId: number, body: unknown) =>
  call(entryRoute.PATCH, `/api/reports/${id}/entries/${entryId}`, {
    method: "PATCH",
    params: { id, entryId: String(entryId) },
    cookie: owner.cookie,
    body,
  });
const history = async (id: string) =>
  (await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: owner.cookie })).body
    .events as { action: string; note: string | null }[];

describe("a course of salt weighed dry, logged in grams", () => {
  it("plans the first dose in grams and logs a grams entry with its g/L, then plans the next one from it", async () => {
    const id = await saltCourse();
    const before = await getCourse(actorOf(owner), id);
    expect(before).toMatchObject({ unit: "g/L", weighedDry: true, gramsAllowed: true, plannedDoseMl: null });
    // 1.5 g/L × 40 L = 60 g (mass concentration, ISO 80000-9).
    expect(before.plannedDoseGrams).toBeCloseTo(60, 9);
    expect(before.nextDose).toMatchObject({ first: true, doseMl: null, unit: "g/L" });
    expect(before.nextDose!.doseGrams).toBeCloseTo(60, 9);
    expect(before.nextDose!.concentration).toBeCloseTo(1.5, 12);

    const t0 = new Date(Date.now() - 2 * HOUR);
    const saved = await dose(id, t0, { amountGrams: 60 });
    expect(saved.status).toBe(201);
    expect(saved.body).toMatchObject({ kind: "dose", amountGrams: 60, amountMl: null });

    const after = await getCourse(actorOf(owner), id);
    expect(after.entries[0]!.concentration).toBeCloseTo(1.5, 12);
    expect(after.entries[0]!.activeGrams).toBe(60);
    expect(after.nextDose!.at).toBe(new Date(t0.getTime() + 24 * HOUR).toISOString());
    expect(after.nextDose!.doseGrams).toBe(60);
    const report = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: owner.cookie });
    expect(report.body.treatment).toMatchObject({ doses: 1 });
    expect(report.body.courseEntries[0]).toMatchObject({ kind: "dose", amountGrams: 60, amountMl: null });
    expect((await history(id)).find((e) => e.action === "dose_logged")!.note).toMatch(/^60 g of dry salt/);
  });

  it("turns 120 g in 40 L into 3 g/L (worked example: 3 g/L × 40 L = 120 g)", async () => {
    const id = await saltCourse({ statedConcentration: 3 });
    expect((await dose(id, new Date(Date.now() - HOUR), { amountGrams: 120 })).status).toBe(201);
    const course = await getCourse(actorOf(owner), id);
    expect(course.entries[0]!.concentration).toBeCloseTo(3, 12);
  });

  it("refuses a dose with both mL and grams, or with neither, saying what to give, and stores nothing", async () => {
    const id = await saltCourse();
    const at = new Date(Date.now() - HOUR);
    const both = await dose(id, at, { amountMl: 600, amountGrams: 60 });
    expect(both.status).toBe(422);
    expect(both.body.error.code).toBe("invalid");
    expect(both.body.error.issues[0]).toMatchObject({
      path: "amountGrams",
      message: expect.stringMatching(/either amountMl .* or amountGrams .*not both/),
    });
    const neither = await dose(id, at, {});
    expect(neither.status).toBe(422);
    expect(neither.body.error.issues[0]).toMatchObject({
      path: "amountMl",
      message: expect.stringMatching(/amountMl.*amountGrams/),
    });
    const zero = await dose(id, at, { amountGrams: 0 });
    expect(zero.status).toBe(422);
    expect(zero.body.error.issues[0]).toMatchObject({ path: "amountGrams", message: "Grams must be above 0." });
    expect((await getCourse(actorOf(owner), id)).entries).toEqual([]);
  });

  it("refuses grams for a treatment dosed in mg/L, and stores nothing", async () => {
    const d = await call(draftsRoute.POST, "/api/reports/drafts", {
      cookie: owner.cookie,
      body: {
        courseOpen: true,
        water: { volume: 40, volumeUnit: "L" },
        treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, stockBasis: "w/v", statedConcentration: 25 },
      },
    });
    const id = d.body.id as string;
    const r = await dose(id, new Date(Date.now() - HOUR), { amountGrams: 5 });
    expect(r.status).toBe(422);
    expect(r.body.error.issues[0]).toMatchObject({ path: "amountGrams", message: expect.stringMatching(/g\/L/) });
    expect((await getCourse(actorOf(owner), id)).entries).toEqual([]);
  });

  it("asks to confirm grams over 3× the planned dose, and names the plausible ceiling in grams' g/L", async () => {
    const id = await saltCourse();
    const at = new Date(Date.now() - HOUR);
    // Planned 60 g: 200 g is over 3× (180 g).
    const typo = await dose(id, at, { amountGrams: 200 });
    expect(typo.status).toBe(422);
    expect(typo.body.error.issues).toEqual([
      {
        path: "amountGrams",
        message: expect.stringMatching(/^200 g is more than 3× the planned dose of 60 g.*confirm: true/),
      },
    ]);
    expect((await getCourse(actorOf(owner), id)).entries).toEqual([]);
    // 1500 g in 40 L = 37.5 g/L, above the catalogue's plausible ceiling for salt (35 g/L).
    const high = await dose(id, at, { amountGrams: 1500 });
    expect(high.status).toBe(422);
    expect(high.body.error.issues.map((i: { path: string; code?: string }) => [i.path, i.code ?? null])).toEqual([
      ["amountGrams", null],
      ["amountGrams", "above_ceiling"],
    ]);
    expect(high.body.error.issues[1].message).toMatch(/37\.5 g\/L/);
    const confirmed = await dose(id, at, { amountGrams: 200, confirm: true });
    expect(confirmed.status).toBe(201);
    expect(confirmed.body.amountGrams).toBe(200);
  });
});

describe("correcting a course entry in grams", () => {
  it("corrects a typo'd grams dose only with confirmation, and keeps the change in the history", async () => {
    const id = await saltCourse();
    const t0 = new Date(Date.now() - 3 * HOUR);
    const typo = await dose(id, t0, { amountGrams: 600, confirm: true });
    expect(typo.status).toBe(201);
    const entryId = typo.body.id as number;

    const stillTooMuch = await patch(id, entryId, { amountGrams: 300 });
    expect(stillTooMuch.status).toBe(422);
    expect(stillTooMuch.body.error.issues[0].path).toBe("amountGrams");
    const both = await patch(id, entryId, { amountGrams: 60, amountMl: 600 });
    expect(both.status).toBe(422);
    expect(both.body.error.issues[0].path).toBe("amountGrams");
    expect((await getCourse(actorOf(owner), id)).entries[0]!.amountGrams).toBe(600);

    const fixed = await patch(id, entryId, { amountGrams: 60, note: "One zero too many." });
    expect(fixed.status).toBe(200);
    expect(fixed.body).toMatchObject({ id: entryId, amountGrams: 60, amountMl: null, struckAt: null });
    const course = await getCourse(actorOf(owner), id);
    expect(course.entries[0]!.concentration).toBeCloseTo(1.5, 12);
    const corrected = (await history(id)).find((e) => e.action === "entry_corrected")!;
    expect(corrected.note).toMatch(/amount 600 g of dry salt → 60 g of dry salt.*One zero too many/);
  });

  it("turns a brine dose logged in mL into the grams weighed instead, and the g/L follows", async () => {
    const id = await saltCourse({
      stockFormId: "brine-10",
      stockPercent: 10,
      stockBasis: "w/v",
      statedConcentration: 3,
    });
    const planned = await getCourse(actorOf(owner), id);
    expect(planned.weighedDry).toBe(false);
    // 3 g/L × 40 L = 120 g = 1200 mL of 100 mg/mL brine.
    expect(planned.plannedDoseMl).toBeCloseTo(1200, 9);
    expect(planned.plannedDoseGrams).toBeCloseTo(120, 9);
    const e = await dose(id, new Date(Date.now() - HOUR), { amountMl: 1200 });
    expect(e.status).toBe(201);
    const asBrine = await getCourse(actorOf(owner), id);
    expect(asBrine.entries[0]!.concentration).toBeCloseTo(3, 12);
    expect(asBrine.entries[0]!.activeGrams).toBeCloseTo(120, 9);

    const r = await patch(id, e.body.id, { amountGrams: 100, note: "Weighed it dry after all." });
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ amountMl: null, amountGrams: 100 });
    const asDry = await getCourse(actorOf(owner), id);
    expect(asDry.entries[0]!.concentration).toBeCloseTo(2.5, 12);
    expect((await history(id)).find((x) => x.action === "entry_corrected")!.note).toMatch(
      /amount 1200 mL → 100 g of dry salt/,
    );
  });
});
