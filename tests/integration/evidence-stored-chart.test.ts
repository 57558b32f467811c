import { beforeAll, describe, expect, it } from "vitest";
import { and, eq, sql } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { drainEvidenceOutbox, recomputeGroupAgent, recomputeStale } from "@/features/evidence/server";
import { getPointsAndSpecies } from "@/features/evidence/server/compute";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

const AGENT = "hydrogen-peroxide";

const detail = async (group: string, condition = "") =>
  call(summaryRoute.GET, `/api/summaries/${group}?agent=${AGENT}${condition ? `&condition=${condition}` : ""}`, {
    params: { groupSlug: group },
  });

/** The API's chart and species, as the live read of the reports gives them. */
const live = (group: string, condition = "") => getPointsAndSpecies(group, AGENT, condition);

const chartOf = (body: { points: unknown; pointBins: unknown; species: unknown }) => ({
  points: body.points,
  pointBins: body.pointBins,
  species: body.species,
});

/** The stored detail row of a pair's condition set, straight from the table. */
async function storedDetail(group: string, condition = "") {
  const db = await getDb();
  const [row] = await db
    .select({ detail: schema.evidenceSummaries.detail })
    .from(schema.evidenceSummaries)
    .where(
      and(
        eq(schema.evidenceSummaries.groupSlug, group),
        eq(schema.evidenceSummaries.agentSlug, AGENT),
        eq(schema.evidenceSummaries.conditionSlug, condition),
      ),
    );
  return row?.detail as Record<string, unknown> | undefined;
}

let groups: { slug: string; species: string[] }[] = [];
let conditions: string[] = [];

/**
 * `n` accepted peroxide reports in `group`, written straight into the table (the routes would take minutes here),
 * with `dose(i)` mg/L; species cycle through the group's (every 5th names none, typing one of two names); conditions
 * alternate between the first two; every 7th lost a fish to the treatment, every 11th showed severe distress, every
 * 3rd cleared the condition, every 13th has no outcome for the condition.
 */
async function insertAccepted(group: { slug: string; species: string[] }, n: number, dose: (i: number) => number) {
  const db = await getDb();
  const rows = Array.from({ length: n }, (_, k) => {
    const i = k + 1;
    const named = i % 5 !== 0;
    return {
      id: `${group.slug}-${i}`,
      authorId: "chart-author",
      status: "accepted" as const,
      groupSlug: group.slug,
      agentSlug: AGENT,
      conditionSlug: conditions[i % 2]!,
      speciesId: named ? group.species[i % group.species.length]! : null,
      speciesOther: named ? null : i % 10 === 0 ? "Unlisted dwarf fish" : "Stripy one",
      concentration: dose(i),
      fishCount: 3,
      fishLost: i % 7 === 0 ? 1 : 0,
      lossCause: i % 7 === 0 ? ("treatment" as const) : null,
      distress: i % 11 === 0 ? ("severe" as const) : ("mild" as const),
      conditionOutcome: i % 13 === 0 ? null : i % 3 === 0 ? ("cleared" as const) : ("improved" as const),
    };
  });
  for (let k = 0; k < rows.length; k += 200)
    await db.insert(schema.reports).values(rows.slice(k, k + 200) as (typeof schema.reports.$inferInsert)[]);
}

beforeAll(async () => {
  const db = await getDb();
  await seedCatalogue(db);
  await db.insert(schema.users).values({
    id: "chart-author",
    name: "Chart Author",
    email: "chart-author@example.org",
    emailVerified: true,
    role: "member",
  });
  const sp = (await db.execute(sql`
    select group_slug, array_agg(id order by id) as ids from species group by group_slug
    having count(*) >= 2 order by group_slug`)) as unknown as { rows: { group_slug: string; ids: string[] }[] };
  groups = sp.rows.slice(0, 4).map((r) => ({ slug: r.group_slug, species: r.ids }));
  expect(groups).toHaveLength(4);
  conditions = (await db.select({ slug: schema.conditions.slug }).from(schema.conditions)).map((c) => c.slug);
  expect(conditions.length).toBeGreaterThanOrEqual(3);
  // Above the points limit, on log-spaced bins: doses 2.5 to 90 mg/L, repeated.
  await insertAccepted(groups[0]!, 701, (i) => 2.5 + ((i * 37) % 351) / 4);
  // A zero dose among them: linear bins above the limit (one condition's set stays below it: points with a zero).
  await insertAccepted(groups[1]!, 520, (i) => (i % 9 === 0 ? 0 : (i * 13) % 120));
  // A single distinct dose: one bin.
  await insertAccepted(groups[2]!, 340, () => 30);
  // Below the limit: one point per report, tied doses with different outcomes.
  await insertAccepted(groups[3]!, 120, (i) => 10 + (i % 6) * 5);
  for (const g of groups) await recomputeGroupAgent(db, g.slug, AGENT);
}, 120_000);

describe("the group page's chart and species, stored by the recompute", () => {
  it("stores them with every condition set's summary", async () => {
    for (const g of groups)
      for (const c of ["", conditions[0]!, conditions[1]!]) {
        const d = await storedDetail(g.slug, c);
        expect(d, `${g.slug} ${c}`).toBeDefined();
        expect(Array.isArray(d!.points) && Array.isArray(d!.pointBins) && Array.isArray(d!.speciesCounts)).toBe(true);
      }
  });

  it("answers from the stored row, not from the reports", async () => {
    const db = await getDb();
    const g = groups[2]!;
    const marker = [{ dose: 1234, tolerated: false, cleared: false }];
    await db.execute(sql`
      update evidence_summaries set detail = jsonb_set(detail, '{points}', ${JSON.stringify(marker)}::jsonb)
       where group_slug = ${g.slug} and agent_slug = ${AGENT} and condition_slug = ''`);
    expect((await detail(g.slug)).body.points).toEqual(marker);
    await recomputeGroupAgent(db, g.slug, AGENT);
    expect((await detail(g.slug)).body.points).toEqual([]);
  });

  it("answers exactly what the live read of the reports gives, for every group and condition", async () => {
    for (const g of groups)
      for (const c of ["", conditions[0]!, conditions[1]!]) {
        const r = await detail(g.slug, c);
        expect(r.status).toBe(200);
        expect(chartOf(r.body), `${g.slug} ${c}`).toEqual(await live(g.slug, c));
      }
  });

  it("covers bins on log and linear doses, one bin for one dose, and points", async () => {
    const [logBins, zero, single, small] = await Promise.all(groups.map((g) => detail(g.slug)));
    expect(logBins!.body.points).toEqual([]);
    expect(logBins!.body.pointBins.length).toBeGreaterThan(30);
    expect(logBins!.body.pointBins[0].from).toBe(2.5);
    // The zero-dose group is cut linearly from 0; its white-spot-or-other half (260 reports) keeps points, with zeros.
    expect(zero!.body.pointBins[0].from).toBe(0);
    const half = await detail(groups[1]!.slug, conditions[0]!);
    expect(half.body.reports).toBeLessThanOrEqual(300);
    expect(half.body.points.some((p: { dose: number }) => p.dose === 0)).toBe(true);
    expect(half.body.pointBins).toEqual([]);
    expect(single!.body.pointBins).toEqual([
      { from: 30, to: 30, reports: 340, tolerated: expect.any(Number), cleared: expect.any(Number) },
    ]);
    expect(small!.body.points).toHaveLength(120);
    expect(small!.body.species.some((s: { id: string | null }) => s.id === null)).toBe(true);
  });

  it("answers no points or species for a condition without reports in a recomputed pair, as the live read does", async () => {
    const r = await detail(groups[0]!.slug, conditions[2]!);
    expect(r.status).toBe(200);
    expect(r.body.reports).toBe(0);
    expect(chartOf(r.body)).toEqual({ points: [], pointBins: [], species: [] });
    expect(chartOf(r.body)).toEqual(await live(groups[0]!.slug, conditions[2]!));
  });

  it("shows a renamed species under its new name without a recompute", async () => {
    const db = await getDb();
    const g = groups[3]!;
    await db.update(schema.species).set({ commonName: "Renamed tetra" }).where(eq(schema.species.id, g.species[0]!));
    const r = await detail(g.slug);
    expect(r.body.species.map((s: { commonName: string }) => s.commonName)).toContain("Renamed tetra");
    expect(chartOf(r.body)).toEqual(await live(g.slug));
  });

  it("recomputes at start-up the pairs whose rows were stored without the chart", async () => {
    const db = await getDb();
    const g = groups[0]!;
    await db.execute(sql`
      update evidence_summaries set detail = jsonb_build_object('bands', detail->'bands')
       where group_slug = ${g.slug} and agent_slug = ${AGENT}`);
    expect((await storedDetail(g.slug))!.pointBins).toBeUndefined();
    // Rows without the chart are still answered, live from the reports.
    expect(chartOf((await detail(g.slug)).body)).toEqual(await live(g.slug));
    expect(await recomputeStale(db)).toBeGreaterThan(0);
    expect(Array.isArray((await storedDetail(g.slug))!.pointBins)).toBe(true);
    expect(await recomputeStale(db)).toBe(0);
  });

  it("reads the reports live where the pair was never recomputed", async () => {
    const db = await getDb();
    const g = { slug: groups[3]!.slug, species: groups[3]!.species };
    await db
      .delete(schema.evidenceSummaries)
      .where(and(eq(schema.evidenceSummaries.groupSlug, g.slug), eq(schema.evidenceSummaries.agentSlug, AGENT)));
    const r = await detail(g.slug);
    expect(r.body.reports).toBe(0);
    expect(r.body.points).toHaveLength(120);
    expect(chartOf(r.body)).toEqual(await live(g.slug));
    await recomputeGroupAgent(db, g.slug, AGENT);
  });

  it("updates them when a report is accepted and the pair recomputed", async () => {
    const g = groups[3]!;
    const [member, mod] = [await signedInUser("member"), await signedInUser("moderator")];
    const before = (await detail(g.slug)).body;
    const body = reportBody({
      speciesId: g.species[1]!,
      fishCount: 4,
      conditionSlug: conditions[1]!,
      treatment: { statedConcentration: 77, doses: 1 },
      outcome: { fishLost: 0, lossCause: null, distress: "mild", condition: "cleared" },
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
    expect(d.status).toBe(200);
    await drainEvidenceOutbox();
    const after = (await detail(g.slug)).body;
    expect(after.points).toHaveLength(before.points.length + 1);
    expect(after.points.at(-1)).toEqual({ dose: 77, tolerated: true, cleared: true });
    expect(chartOf(after)).toEqual(await live(g.slug));
    const cond = await detail(g.slug, conditions[1]!);
    expect(chartOf(cond.body)).toEqual(await live(g.slug, conditions[1]!));
    expect((await storedDetail(g.slug))!.points).toEqual(after.points);
  });
});
