import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as summariesRoute from "@/app/api/summaries/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import * as csvRoute from "@/app/api/export/summaries.csv/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let a: U, b: U, c: U, mod: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  [a, b, c, mod] = [
    await signedInUser("member"),
    await signedInUser("member"),
    await signedInUser("member"),
    await signedInUser("moderator"),
  ];
});

/** A corydoras report dosed by stated concentration (no amount), so its dose is exactly `dose`. */
async function accepted(
  author: U,
  dose: number,
  opts: { lost?: number; severe?: boolean; cleared?: boolean; condition?: string } = {},
) {
  const body = reportBody({
    speciesId: "corydoras-paleatus",
    fishCount: 4,
    conditionSlug: opts.condition ?? "white-spot",
    treatment: { statedConcentration: dose, doses: 1 },
    outcome: {
      fishLost: opts.lost ?? 0,
      lossCause: opts.lost ? "treatment" : null,
      distress: opts.severe ? "severe" : "mild",
      condition: opts.cleared ? "cleared" : "improved",
    },
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
  expect(d.body).toEqual({ id: r.body.id, status: "accepted" });
  return r.body.id as string;
}

// Decisions queue their recompute; the evidence worker is not running in tests, so drain before reading.
const detail = async (q = "") =>
  (await drainEvidenceOutbox(),
  await call(summaryRoute.GET, `/api/summaries/corydoras?agent=hydrogen-peroxide${q}`, {
    params: { groupSlug: "corydoras" },
  })).body;

describe("a fixture club worked out by hand", () => {
  let retractable = "";
  it("summarises eight accepted corydoras reports figure by figure", async () => {
    // Tolerated doses 10, 15, 20, 25, 30, 35 mg/L; adverse: 28 (severe distress) and 40 (a fish lost to the treatment).
    retractable = await accepted(a, 10);
    await accepted(a, 15);
    await accepted(b, 20, { cleared: true });
    await accepted(b, 25, { cleared: true });
    await accepted(b, 28, { severe: true, cleared: true });
    await accepted(c, 30, { cleared: true, condition: "gill-flukes" });
    await accepted(c, 35, { cleared: true, condition: "gill-flukes" });
    await accepted(a, 40, { lost: 1 });

    const s = await detail();
    expect(s.anecdotal).toBe(true);
    expect(s.notice).toMatch(/Anecdotal/);
    expect(s).toMatchObject({
      reports: 8,
      members: 3,
      fish: 32,
      tolerated: 6,
      lowestAdverseDose: 28,
      sparse: false,
      confidenceLevel: 95,
    });
    // Wilson 95 %, 6 of 8: z = 1.959964; centre (0.75 + z²/16)/(1 + z²/8) = 0.66890, half-width 0.25962 → [0.40928, 0.92852].
    expect(s.toleratedShare.value).toBe(0.75);
    expect(s.toleratedShare.low).toBeCloseTo(0.409275, 5);
    expect(s.toleratedShare.high).toBeCloseTo(0.928521, 5);
    // Type 7 over 10, 15, 20, 25, 30, 35 (h = 5p): p10 → 12.5; p25 → 16.25; median → 22.5; p75 → 28.75; p90 → 32.5.
    expect(s.toleratedDose).toMatchObject({
      min: 10,
      p10: 12.5,
      p25: 16.25,
      median: 22.5,
      p75: 28.75,
      p90: 32.5,
      max: 35,
    });
    // n = 6: r = 1 since P(B ≤ 0) = 1/64 ≤ 0.025 < P(B ≤ 1) = 7/64 → (x₍₁₎, x₍₆₎) = (10, 35), coverage 1 − 2/64.
    expect(s.toleratedDose.medianInterval).toEqual({ low: 10, high: 35, coverage: 0.96875 });
    // Bands [from, to): [10,20) 10,15 → 2 of 2 tolerated, 0 cleared; [20,30) 20,25,28 → 2 of 3 tolerated, 3 cleared;
    // [30,40) 30,35 → 2 of 2, 2 cleared; [40,50) 40 → 0 of 1.
    const band = (from: number) => s.bands.find((x: { from: number }) => x.from === from);
    expect(band(10)).toMatchObject({ to: 20, reports: 2, tolerated: 2, cleared: 0 });
    expect(band(20)).toMatchObject({ to: 30, reports: 3, tolerated: 2, cleared: 3 });
    expect(band(30)).toMatchObject({ reports: 2, tolerated: 2, cleared: 2 });
    expect(band(40)).toMatchObject({ reports: 1, tolerated: 0, cleared: 0 });
    expect(band(0)).toMatchObject({ reports: 0 });
    // Wilson 95 % for 2 of 3: [0.20766, 0.93851] (same formula).
    expect(band(20).toleratedShare.low).toBeCloseTo(0.20766, 5);
    expect(band(20).toleratedShare.high).toBeCloseTo(0.93851, 5);
    expect(s.points).toHaveLength(8);
    expect(s.points[0]).toEqual({ dose: 10, tolerated: true, cleared: false });
    expect(JSON.stringify(s.points)).not.toMatch(/author|member|email/);
    expect(s.species).toEqual([
      { id: "corydoras-paleatus", commonName: "Peppered corydoras", scientificName: "Corydoras paleatus", reports: 8 },
    ]);

    // Filtered by condition: the two gill-fluke reports only.
    const gf = await detail("&condition=gill-flukes");
    expect(gf).toMatchObject({ reports: 2, tolerated: 2, sparse: true, condition: "gill-flukes" });
    expect(gf.toleratedDose.medianInterval).toBeNull();
  });

  it("answers medianInterval null with five tolerated doses once one is retracted, and recomputes", async () => {
    const r = await call(decisionRoute.POST, `/api/reports/${retractable}/decision`, {
      params: { id: retractable },
      cookie: mod.cookie,
      body: { decision: "retract", note: "Entered twice." },
    });
    expect(r.body.status).toBe("retracted");
    const s = await detail();
    expect(s.tolerated).toBe(5);
    expect(s.reports).toBe(7);
    expect(s.toleratedDose.medianInterval).toBeNull();
    expect(s.toleratedDose.median).toBe(25);
  });

  it("lists every group with its summary, and exports CSV with the notice inside", async () => {
    await drainEvidenceOutbox();
    const list = await call(summariesRoute.GET, "/api/summaries?agent=hydrogen-peroxide");
    expect(list.status).toBe(200);
    expect(list.body).toMatchObject({ agent: "hydrogen-peroxide", unit: "mg/L", confidenceLevel: 95, anecdotal: true });
    const cory = list.body.groups.find((g: { group: { slug: string } }) => g.group.slug === "corydoras");
    expect(cory).toMatchObject({ reports: 7, tolerated: 5 });
    expect(cory.bands).toBeUndefined();
    const empty = list.body.groups.find((g: { group: { slug: string } }) => g.group.slug === "loaches");
    expect(empty).toMatchObject({ reports: 0, sparse: true, toleratedDose: { median: null, medianInterval: null } });

    const csv = await call(csvRoute.GET, "/api/export/summaries.csv?agent=hydrogen-peroxide");
    expect(csv.res.headers.get("content-type")).toMatch(/text\/csv/);
    const lines = (csv.body as string).split("\n");
    expect(lines[0]).toMatch(/^# Anecdotal evidence/);
    expect(lines[2]).toMatch(/^group,group_name,agent,unit,condition,reports/);
    expect(lines.find((l) => l.startsWith("corydoras,"))).toMatch(/,7,3,28,5,/);

    const bad = await call(summariesRoute.GET, "/api/summaries?agent=snake-oil");
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues[0].path).toBe("agent");
    // Without an agent the list is hydrogen peroxide's, as on the evidence pages (an extension of the contract).
    const bare = await call(summariesRoute.GET, "/api/summaries");
    expect(bare.status).toBe(200);
    expect(bare.body.agent).toBe("hydrogen-peroxide");
    const blank = await call(summariesRoute.GET, "/api/summaries?agent=");
    expect(blank.status).toBe(422);
    expect(blank.body.error.issues[0].path).toBe("agent");
  });

  it("reads stored summaries: no recompute on a read", async () => {
    const db = await getDb();
    const [row] = await db
      .select()
      .from(schema.evidenceSummaries)
      .where(and(eq(schema.evidenceSummaries.groupSlug, "corydoras"), eq(schema.evidenceSummaries.conditionSlug, "")));
    await detail();
    const [again] = await db
      .select()
      .from(schema.evidenceSummaries)
      .where(and(eq(schema.evidenceSummaries.groupSlug, "corydoras"), eq(schema.evidenceSummaries.conditionSlug, "")));
    expect(again!.computedAt.getTime()).toBe(row!.computedAt.getTime());
  });
});
