import { drainEvidenceOutbox } from "@/features/evidence/server";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as summariesRoute from "@/app/api/summaries/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import * as csvRoute from "@/app/api/export/summaries.csv/route";
import * as openapiRoute from "@/app/api/openapi.json/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { fitDoseResponse, METHOD_VERSION, type Trial } from "@/features/evidence";
import { recomputeStale } from "@/features/evidence/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";
import { generatedReports } from "../support/dose-data";

type U = Awaited<ReturnType<typeof signedInUser>>;
let members: U[], mod: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  members = [await signedInUser("member"), await signedInUser("member"), await signedInUser("member")];
  mod = await signedInUser("moderator");
});

/** Files and accepts one report dosed by stated concentration, so its dose is exactly `dose`. */
async function accepted(author: U, speciesId: string, dose: number, adverse: boolean, condition: string) {
  const body = reportBody({
    speciesId,
    fishCount: 5,
    conditionSlug: condition,
    treatment: { statedConcentration: dose, doses: 1 },
    // Adverse as statistics.md defines it: here, severe distress.
    outcome: { fishLost: 0, lossCause: null, distress: adverse ? "severe" : "mild", condition: "improved" },
    submit: true,
  });
  delete body.treatment.amountMl;
  delete body.treatment.intervalHours;
  const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: author.cookie });
  expect(r.status).toBe(201);
  const d = await call(decisionRoute.POST, `/api/reports/${r.body.id}/decision`, {
    params: { id: r.body.id },
    cookie: mod.cookie,
    body: { decision: "accept" },
  });
  expect(d.body.status).toBe("accepted");
}

const detail = async (group: string, q = "") =>
  (await drainEvidenceOutbox(),
  await call(summaryRoute.GET, `/api/summaries/${group}?agent=hydrogen-peroxide${q}`, { params: { groupSlug: group } }))
    .body;
const trialsOf = (rs: { dose: number; adverse: boolean }[]): Trial[] =>
  rs.map((r) => ({ dose: r.dose, n: 1, adverse: r.adverse ? 1 : 0 }));

describe("the dose–response fit through the API", () => {
  // The same generated reports as the reference test's independent fit (known logistic curve, seeded).
  const reports = generatedReports(1, 48);
  const condition = (i: number) => (i % 2 === 0 ? "white-spot" : "gill-flukes");

  it("answers for accepted corydoras reports the fit the pure code makes of them", { timeout: 300_000 }, async () => {
    for (const [i, r] of reports.entries())
      await accepted(members[i % 3]!, "corydoras-paleatus", r.dose, r.adverse, condition(i));
    const s = await detail("corydoras");
    expect(s.reports).toBe(48);
    const expected = fitDoseResponse(trialsOf(reports), 95);
    expect(expected).toHaveProperty("bmdl");
    expect(s.doseResponse).toEqual(expected);
    // Every curve point lies within its own interval.
    for (const p of s.doseResponse.curve) {
      expect(p.low).toBeLessThanOrEqual(p.risk);
      expect(p.risk).toBeLessThanOrEqual(p.high);
    }
    // Per condition too, from the same one aggregate.
    const ws = await detail("corydoras", "&condition=white-spot");
    expect(ws.doseResponse).toEqual(
      fitDoseResponse(trialsOf(reports.filter((_, i) => condition(i) === "white-spot")), 95),
    );

    const list = await call(summariesRoute.GET, "/api/summaries?agent=hydrogen-peroxide");
    const cory = list.body.groups.find((g: { group: { slug: string } }) => g.group.slug === "corydoras");
    expect(cory.doseResponse).toEqual(expected);
    expect(list.body.methodVersion).toBe(METHOD_VERSION);
    const empty = list.body.groups.find((g: { group: { slug: string } }) => g.group.slug === "loaches");
    expect(empty.doseResponse).toMatchObject({ model: "logit-log10", fit: null });

    const csv = (await call(csvRoute.GET, "/api/export/summaries.csv?agent=hydrogen-peroxide")).body as string;
    const lines = csv.split("\n");
    const header = lines[2]!.split(",");
    const row = lines.find((l) => l.startsWith("corydoras,"))!.split(",");
    expect(Number(row[header.indexOf("bmd10")])).toBe((expected as { bmd: number }).bmd);
    expect(Number(row[header.indexOf("bmdl10")])).toBe((expected as { bmdl: number }).bmdl);
    expect(lines.find((l) => l.startsWith("loaches,"))!.split(",")[header.indexOf("bmd10")]).toBe("");
  });

  it("answers fit null with a reason for a group with 3 reports", async () => {
    await accepted(members[0]!, "paracheirodon-innesi", 10, false, "white-spot");
    await accepted(members[1]!, "paracheirodon-innesi", 20, true, "white-spot");
    await accepted(members[2]!, "paracheirodon-innesi", 40, true, "white-spot");
    const s = await detail("tetras");
    expect(s.reports).toBe(3);
    expect(s.doseResponse).toEqual({
      model: "logit-log10",
      fit: null,
      reason: expect.stringMatching(/Only 3 reports.*at least 10/),
    });
  });

  it("answers no curve from separated data", async () => {
    // Six tolerated courses at 5–30 mg/L, six that went badly at 35–60: a dose splits the outcomes perfectly.
    for (let i = 0; i < 12; i++) await accepted(members[i % 3]!, "betta-splendens", 5 * (i + 1), i >= 6, "white-spot");
    const s = await detail("anabantoids");
    expect(s.reports).toBe(12);
    expect(s.doseResponse).toEqual({
      model: "logit-log10",
      fit: null,
      reason: expect.stringMatching(/split cleanly by dose/),
    });
    expect(s.doseResponse.curve).toBeUndefined();
  });

  it("documents doseResponse in the OpenAPI document", async () => {
    const r = await call(openapiRoute.GET, "/api/openapi.json");
    const schema = r.body.paths["/api/summaries/{groupSlug}"].get.responses["200"].content["application/json"].schema;
    const shapes = schema.properties.doseResponse.anyOf;
    expect(shapes).toHaveLength(2);
    expect(Object.keys(shapes[0].properties)).toEqual([
      "model",
      "a",
      "b",
      "seA",
      "seB",
      "covAB",
      "bmr",
      "bmd",
      "bmdl",
      "bmdu",
      "deviance",
      "df",
      "curve",
    ]);
    expect(shapes[1].properties.fit).toEqual({ type: "null" });
    expect(schema.required).toContain("doseResponse");
  });

  it("recomputes summaries stored by an older method when asked at start", async () => {
    const db = await getDb();
    const where = and(
      eq(schema.evidenceSummaries.groupSlug, "corydoras"),
      eq(schema.evidenceSummaries.conditionSlug, ""),
    );
    const [before] = await db.select().from(schema.evidenceSummaries).where(where);
    const { doseResponse: _dr, ...old } = before!.summary as Record<string, unknown>;
    await db.update(schema.evidenceSummaries).set({ methodVersion: "2026.12-1", summary: old }).where(where);
    expect(await recomputeStale(db)).toBeGreaterThan(0);
    const [after] = await db.select().from(schema.evidenceSummaries).where(where);
    expect(after!.methodVersion).toBe(METHOD_VERSION);
    expect((after!.summary as { doseResponse: unknown }).doseResponse).toEqual(
      (before!.summary as { doseResponse: unknown }).doseResponse,
    );
    expect(await recomputeStale(db)).toBe(0);
  });
});
