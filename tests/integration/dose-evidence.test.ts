import { beforeAll, describe, expect, it } from "vitest";
import ICAL from "ical.js";
import * as doseRoute from "@/app/api/dose/route";
import * as icsRoute from "@/app/api/dose/plan.ics/route";
import * as openapiRoute from "@/app/api/openapi.json/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let member: U, mod: U;
const qs = (q: Record<string, string | number>) =>
  new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]));
const get = (q: Record<string, string | number>) => call(doseRoute.GET, `/api/dose?${qs(q)}`);
const ics = (q: Record<string, string | number>) => call(icsRoute.GET, `/api/dose/plan.ics?${qs(q)}`);

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
  const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: member.cookie });
  expect(r.status).toBe(201);
  const d = await call(decisionRoute.POST, `/api/reports/${r.body.id}/decision`, {
    params: { id: r.body.id },
    cookie: mod.cookie,
    body: { decision: "accept" },
  });
  expect(d.body.status).toBe("accepted");
}

beforeAll(async () => {
  await seedCatalogue(await getDb());
  [member, mod] = [await signedInUser("member"), await signedInUser("moderator")];
  // Corydoras: tolerated at 10, 15, 20, 25, 30 (median 20, max 30); lost at 12 — below the median.
  for (const d of [10, 15, 20, 25, 30]) await accepted("corydoras-paleatus", d);
  await accepted("corydoras-aeneus", 12, true);
  // Loaches: two tolerated reports only (sparse).
  for (const d of [18, 22]) await accepted("pangio-kuhlii", d);
  await drainEvidenceOutbox();
}, 120_000);

const base = { agent: "hydrogen-peroxide", stockPercent: 3, volume: 40, volumeUnit: "L" };

describe("GET /api/dose with a species or group", () => {
  it("answers the group's evidence, a first dose below the lowest adverse dose, and warns at the median", async () => {
    const r = await get({ ...base, speciesId: "corydoras-sterbai", target: 20 });
    expect(r.status).toBe(200);
    expect(r.body.evidence).toMatchObject({
      group: { slug: "corydoras" },
      reports: 6,
      tolerated: 5,
      lowestAdverseDose: 12,
      sparse: false,
    });
    expect(r.body.evidence.toleratedDose).toMatchObject({ median: 20, max: 30 });
    // ½ × 20 = 10 mg/L, below 12; 10 mg/L × 40 L / 30 mg/mL (3 % w/v) = 13.33 mL.
    expect(r.body.suggestedFirstDose).toMatchObject({ fraction: 0.5, concentration: 10, limitedBy: "median" });
    expect(r.body.suggestedFirstDose.concentration).toBeLessThan(r.body.evidence.lowestAdverseDose);
    expect(r.body.suggestedFirstDose.doseMl).toBeCloseTo(40 / 3, 9);
    const codes = r.body.warnings.map((w: { code: string }) => w.code);
    expect(codes).toContain("at_or_above_lowest_adverse");
    expect(codes).toContain("lowest_adverse_at_or_below_median");
    expect(r.body.warnings.every((w: { message: string }) => w.message.length > 20)).toBe(true);
    // The existing fields are unchanged.
    expect(r.body).toMatchObject({
      agent: "hydrogen-peroxide",
      unit: "mg/L",
      volumeL: 40,
      stockMgPerMl: 30,
      target: 20,
      concentration: 20,
    });
  });

  it("answers the same by group slug, and warns above the highest tolerated dose", async () => {
    const r = await get({ ...base, group: "corydoras", target: 31 });
    expect(r.body.evidence.group.slug).toBe("corydoras");
    expect(r.body.warnings.map((w: { code: string }) => w.code)).toContain("above_highest_tolerated");
  });

  it("warns above the agent's plausible ceiling when 250 is typed for 25", async () => {
    const r = await get({ ...base, speciesId: "corydoras-sterbai", target: 250 });
    expect(r.status).toBe(200);
    expect(r.body.warnings.map((w: { code: string }) => w.code)).toContain("above_ceiling");
    const plain = await get({ ...base, target: 250 });
    expect(plain.body.warnings.map((w: { code: string }) => w.code)).toEqual(["above_ceiling"]);
  });

  it("says when the evidence is sparse, or when the group has none", async () => {
    const sparse = await get({ ...base, group: "loaches", target: 10 });
    expect(sparse.body.warnings.map((w: { code: string }) => w.code)).toEqual(["sparse_evidence"]);
    expect(sparse.body.suggestedFirstDose.concentration).toBe(10);
    const none = await get({ ...base, group: "plecos", target: 10 });
    expect(none.body.evidence.reports).toBe(0);
    expect(none.body.warnings.map((w: { code: string }) => w.code)).toEqual(["no_evidence"]);
    expect(none.body.suggestedFirstDose).toBeNull();
  });

  it("carries warnings on every answer, empty for a plain plan in range", async () => {
    const r = await get({ ...base, target: 25 });
    expect(r.body.warnings).toEqual([]);
    expect(r.body.evidence).toBeUndefined();
  });

  it("answers 422 for an unknown species or group, or a species outside the named group", async () => {
    for (const [q, path] of [
      [{ speciesId: "no-such-fish" }, "speciesId"],
      [{ group: "no-such-group" }, "group"],
      [{ speciesId: "corydoras-sterbai", group: "loaches" }, "group"],
    ] as const) {
      const r = await get({ ...base, target: 10, ...q });
      expect(r.status).toBe(422);
      expect(r.body.error.issues.map((i: { path: string }) => i.path)).toContain(path);
    }
  });
});

describe("how /api/dose reads a stock strength", () => {
  it("reads a bare 1 % w/v copper as 10 mg/mL of Cu²⁺: 2 mL for 0.2 mg/L in 100 L", async () => {
    const r = await get({ agent: "copper", stockPercent: 1, basis: "w/v", volume: 100, volumeUnit: "L", target: 0.2 });
    expect(r.status).toBe(200);
    expect(r.body.stockMgPerMl).toBe(10);
    expect(r.body.doseMl).toBeCloseTo(2, 12);
    expect(r.body.stock).toEqual({
      percent: 1,
      basis: "w/v",
      densityGPerMl: null,
      of: "agent",
      compound: null,
      activeFraction: 1,
      presetId: null,
    });
  });

  it("applies the copper sulfate preset's fraction only when it is named", async () => {
    const r = await get({ agent: "copper", stockFormId: "cu-sulfate-1", volume: 100, volumeUnit: "L", target: 0.2 });
    expect(r.body.stock).toMatchObject({ percent: 1, of: "compound", presetId: "cu-sulfate-1" });
    expect(r.body.stock.compound).toMatch(/pentahydrate/);
    // 63.546 / 249.677 (IUPAC standard atomic weights) = 0.254513 → 20 mg / 2.54513 mg/mL = 7.858 mL.
    expect(r.body.stock.activeFraction).toBeCloseTo(0.254513, 6);
    expect(r.body.doseMl).toBeCloseTo(7.858, 3);
  });
});

describe("GET /api/dose/plan.ics", () => {
  it("holds 3 dose events 48 h apart from start, plus the checks, and parses as iCalendar", async () => {
    const start = "2026-12-02T18:00:00.000Z";
    const r = await ics({
      ...base,
      target: 20,
      fraction: 0.5,
      speciesId: "corydoras-sterbai",
      start,
      doses: 3,
      intervalHours: 48,
    });
    expect(r.status).toBe(200);
    expect(r.res.headers.get("content-type")).toMatch(/^text\/calendar/);
    const text = typeof r.body === "string" ? r.body : await r.res.text();
    // RFC 5545 §3.1: content lines are at most 75 octets, folded with CRLF and a space (the cautions hold dashes).
    expect(text).toMatch(/\u2014|–|µ|…/);
    const tooLong = text.split("\r\n").filter((l: string) => Buffer.byteLength(l, "utf8") > 75);
    expect(tooLong).toEqual([]);
    const cal = new ICAL.Component(ICAL.parse(text));
    const events = cal.getAllSubcomponents("vevent").map((v) => new ICAL.Event(v));
    const doses = events.filter((e) => /Dose \d of 3/.test(e.summary));
    expect(doses).toHaveLength(3);
    const times = doses.map((e) => e.startDate.toJSDate().getTime()).sort((a, b) => a - b);
    expect(times[0]).toBe(Date.parse(start));
    expect(times[1]! - times[0]!).toBe(48 * 3600_000);
    expect(times[2]! - times[1]!).toBe(48 * 3600_000);
    // First dose reduced (½ of 20 mg/L = 10 mg/L: 13.33 mL of 3 % in 40 L, measured down to 13 mL), then full (26.67 → 26 mL).
    expect(doses[0]!.summary).toContain("10 mg/L");
    expect(doses[1]!.summary).toContain("20 mg/L");
    expect(doses[1]!.summary).toMatch(/26 mL/);
    const checks = events.filter((e) => !/Dose \d of 3/.test(e.summary));
    // A check an hour after each dose, then the peroxide's 7 days of watching after the last.
    expect(checks).toHaveLength(3 + 7);
    expect(events.every((e) => e.description.includes("Before you treat"))).toBe(true);
    expect(doses[0]!.description).toContain("WARNINGS");
  });

  it("uses the agent's redosing interval when none is given, and asks for one where the agent has none", async () => {
    const r = await ics({ ...base, target: 20, start: "2026-12-02T18:00:00Z", doses: 2 });
    const text = typeof r.body === "string" ? r.body : await r.res.text();
    const events = new ICAL.Component(ICAL.parse(text))
      .getAllSubcomponents("vevent")
      .map((v) => new ICAL.Event(v))
      .filter((e) => /Dose/.test(e.summary));
    expect(events[1]!.startDate.toJSDate().getTime() - events[0]!.startDate.toJSDate().getTime()).toBe(48 * 3600_000);
    const salt = await ics({
      agent: "salt",
      stockFormId: "brine-10",
      volume: 40,
      volumeUnit: "L",
      target: 3,
      start: "2026-12-02T18:00:00Z",
      doses: 3,
    });
    expect(salt.status).toBe(422);
    expect(salt.body.error.issues.map((i: { path: string }) => i.path)).toContain("intervalHours");
    const bad = await ics({ ...base, target: 20, start: "tomorrow", doses: 3 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path)).toContain("start");
  });
});

describe("the OpenAPI document", () => {
  it("describes the dose planner's warnings, evidence, first dose and stock reading, and the calendar", async () => {
    const r = await call(openapiRoute.GET, "/api/openapi.json");
    const dose = r.body.paths["/api/dose"].get;
    const props = dose.responses["200"].content["application/json"].schema.properties;
    expect(props.warnings.items.properties.code.enum).toEqual(
      expect.arrayContaining([
        "above_ceiling",
        "at_or_above_lowest_adverse",
        "above_highest_tolerated",
        "sparse_evidence",
        "no_evidence",
      ]),
    );
    expect(props.evidence.properties.lowestAdverseDose).toBeDefined();
    expect(Object.keys(props.suggestedFirstDose.anyOf?.[0]?.properties ?? props.suggestedFirstDose.properties)).toEqual(
      expect.arrayContaining(["fraction", "concentration", "doseMl"]),
    );
    // stock is null for salt weighed dry (form=dry), so the document gives it as anyOf [object, null].
    expect((props.stock.anyOf?.[0] ?? props.stock).properties.of.enum).toEqual(["compound", "agent"]);
    expect(props.form.enum).toEqual(["stock", "dry"]);
    expect(props.doseGrams).toBeDefined();
    expect(dose.parameters.map((p: { name: string }) => p.name)).toEqual(
      expect.arrayContaining(["speciesId", "group", "form", "addedGrams"]),
    );
    const ics = r.body.paths["/api/dose/plan.ics"].get;
    expect(Object.keys(ics.responses["200"].content)).toEqual(["text/calendar"]);
    expect(ics.parameters.map((p: { name: string }) => p.name)).toEqual(
      expect.arrayContaining(["start", "doses", "intervalHours"]),
    );
  });
});

describe("how a report's concentration reads its stock strength", () => {
  const copper = (treatment: Record<string, unknown>) =>
    reportBody({
      water: { volume: 100, volumeUnit: "L" },
      treatment: { agentSlug: "copper", stockPercent: 1, stockBasis: "w/v", amountMl: 2, doses: 1, ...treatment },
    });

  it("reads a bare 1 % w/v copper as Cu²⁺, like /api/dose: 2 mL in 100 L makes 0.2 mg/L", async () => {
    const body = copper({});
    delete body.treatment.intervalHours;
    const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: member.cookie });
    expect(r.status).toBe(201);
    expect(r.body.concentration).toBeCloseTo(0.2, 12);
  });

  it("applies the copper sulfate fraction when the report names that stock form", async () => {
    const body = copper({ stockFormId: "cu-sulfate-1" });
    delete body.treatment.intervalHours;
    const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: member.cookie });
    expect(r.status).toBe(201);
    // 2 mL × 2.54513 mg/mL (IUPAC atomic weights, see the reference test) / 100 L = 0.0509 mg/L.
    expect(r.body.concentration).toBeCloseTo(0.0509026, 6);
  });

  it("answers 422 for a stock form of another agent", async () => {
    const body = copper({ stockFormId: "h2o2-3" });
    delete body.treatment.intervalHours;
    const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: member.cookie });
    expect(r.status).toBe(422);
    expect(r.body.error.issues.map((i: { path: string }) => i.path)).toContain("treatment.stockFormId");
  });
});

describe("the club's first-dose share", () => {
  it("offers ⅓ of the usual dose once the club chooses it, and never more than the keeper's own fraction", async () => {
    const db = await getDb();
    await db
      .update(schema.clubSettings)
      .set({ firstDoseFraction: 1 / 3 })
      .where(eq(schema.clubSettings.id, 1));
    try {
      const third = await get({ ...base, group: "corydoras", target: 10 });
      // ⅓ × 20 (the corydoras median) = 6.67 mg/L, below the lowest adverse 12.
      expect(third.body.suggestedFirstDose.fraction).toBeCloseTo(1 / 3, 12);
      expect(third.body.suggestedFirstDose.concentration).toBeCloseTo(20 / 3, 12);
      const quarter = await get({ ...base, group: "corydoras", target: 10, fraction: 0.25 });
      expect(quarter.body.suggestedFirstDose.concentration).toBeCloseTo(5, 12);
    } finally {
      await db.update(schema.clubSettings).set({ firstDoseFraction: 0.5 }).where(eq(schema.clubSettings.id, 1));
    }
  });
});
