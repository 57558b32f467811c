import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { recomputeGroupAgent } from "@/features/evidence/server";
import { call } from "../support/http";

const detail = async (group: string) =>
  call(summaryRoute.GET, `/api/summaries/${group}?agent=hydrogen-peroxide`, { params: { groupSlug: group } });

/**
 * `n` accepted peroxide reports in `group`, written straight into the table (the route would take minutes at this
 * size): doses 5 + (i mod 86) mg/L; every 7th lost a fish to the treatment, every 3rd cleared the condition.
 */
async function insertAccepted(group: string, n: number) {
  const db = await getDb();
  await db.execute(sql`
    insert into reports (id, author_id, status, group_slug, agent_slug, condition_slug, concentration, fish_count, fish_lost, loss_cause, distress, condition_outcome)
    select ${group} || '-' || i, 'bins-author', 'accepted', ${group}, 'hydrogen-peroxide', 'white-spot', 5 + (i % 86)::float8, 3,
           case when i % 7 = 0 then 1 else 0 end, case when i % 7 = 0 then 'treatment' end, 'mild',
           case when i % 3 = 0 then 'cleared' else 'improved' end
      from generate_series(1, ${n}) as i`);
  await recomputeGroupAgent(db, group, "hydrogen-peroxide");
}

/** The expected counts, worked out from the same rule as the insert. */
function expected(n: number) {
  let tolerated = 0,
    cleared = 0;
  for (let i = 1; i <= n; i++) {
    if (i % 7 !== 0) tolerated++;
    if (i % 3 === 0) cleared++;
  }
  return { reports: n, tolerated, cleared };
}

type Bin = { from: number; to: number; reports: number; tolerated: number; cleared: number };

beforeAll(async () => {
  const db = await getDb();
  await seedCatalogue(db);
  await db.insert(schema.users).values({
    id: "bins-author",
    name: "Bin Author",
    email: "bins-author@example.org",
    emailVerified: true,
    role: "member",
  });
  await insertAccepted("tetras", 301);
  await insertAccepted("loaches", 300);
}, 120_000);

describe("GET /api/summaries/:groupSlug points and dose bins", () => {
  it("answers no points and narrow dose bins above 300 reports, the bins summing to the group's counts", async () => {
    const r = await detail("tetras");
    expect(r.status).toBe(200);
    const want = expected(301);
    expect(r.body).toMatchObject({ reports: want.reports, tolerated: want.tolerated });
    expect(r.body.points).toEqual([]);
    const bins = r.body.pointBins as Bin[];
    expect(bins.length).toBeGreaterThan(10);
    expect(bins.length).toBeLessThanOrEqual(60);
    const sum = (k: keyof Bin) => bins.reduce((a, b) => a + b[k], 0);
    expect(sum("reports")).toBe(want.reports);
    expect(sum("tolerated")).toBe(want.tolerated);
    expect(sum("cleared")).toBe(want.cleared);
    // Ordered, non-overlapping, spanning the doses reported (5 to 90 mg/L).
    expect(bins[0]!.from).toBeCloseTo(5, 9);
    expect(bins.at(-1)!.to).toBeCloseTo(90, 9);
    for (let i = 0; i < bins.length; i++) {
      expect(bins[i]!.to).toBeGreaterThan(bins[i]!.from);
      if (i > 0) expect(bins[i]!.from).toBeGreaterThanOrEqual(bins[i - 1]!.to - 1e-9);
    }
    // The first log-spaced bin is [5, 5 × 18^(1/60)) = [5, 5.245): only the dose 5, reported at i = 86, 172 and 258.
    const atFive = Array.from({ length: 301 }, (_, k) => k + 1).filter((i) => i % 86 === 0).length;
    expect(atFive).toBe(3);
    expect(bins[0]!.reports).toBe(atFive);
  });

  it("answers one point per report, and no bins, at 300 reports", async () => {
    const r = await detail("loaches");
    expect(r.status).toBe(200);
    expect(r.body.reports).toBe(300);
    expect(r.body.points).toHaveLength(300);
    expect(r.body.pointBins).toEqual([]);
    const want = expected(300);
    expect(r.body.points.filter((p: { tolerated: boolean }) => p.tolerated)).toHaveLength(want.tolerated);
    expect(r.body.points.filter((p: { cleared: boolean }) => p.cleared)).toHaveLength(want.cleared);
  });
});
