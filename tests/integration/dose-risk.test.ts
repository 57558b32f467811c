import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import * as doseRoute from "@/app/api/dose/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { recomputeGroupAgent } from "@/features/evidence/server";
import { call } from "../support/http";

const qs = (q: Record<string, string | number>) =>
  new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]));
const get = (q: Record<string, string | number>) => call(doseRoute.GET, `/api/dose?${qs(q)}`);
const base = { agent: "hydrogen-peroxide", stockPercent: 3, volume: 40, volumeUnit: "L" };

/**
 * Ten accepted peroxide reports at each of 5, 10, 20, 40 and 80 mg/L, of which 0, 1, 2, 4 and 7 lost a fish to the
 * treatment: risk rising with dose without separation, so the group gets a fitted curve. Written straight into the
 * table (fifty reports through the routes would take a minute).
 */
async function insertRising(group: string) {
  const db = await getDb();
  await db.execute(sql`
    insert into reports (id, author_id, status, group_slug, agent_slug, condition_slug, concentration, fish_count, fish_lost, loss_cause, distress, condition_outcome)
    select ${group} || '-' || i, 'risk-author', 'accepted', ${group}, 'hydrogen-peroxide', 'white-spot',
           (array[5, 10, 20, 40, 80]::float8[])[1 + (i - 1) / 10], 3,
           case when (i - 1) % 10 < (array[0, 1, 2, 4, 7])[1 + (i - 1) / 10] then 1 else 0 end,
           case when (i - 1) % 10 < (array[0, 1, 2, 4, 7])[1 + (i - 1) / 10] then 'treatment' end, 'mild', 'improved'
      from generate_series(1, 50) as i`);
  await recomputeGroupAgent(db, group, "hydrogen-peroxide");
}

beforeAll(async () => {
  const db = await getDb();
  await seedCatalogue(db);
  await db.insert(schema.users).values({
    id: "risk-author",
    name: "Risk Author",
    email: "risk-author@example.org",
    emailVerified: true,
    role: "member",
  });
  await insertRising("tetras");
  // Loaches: three reports, too few for a curve.
  await db.execute(sql`
    insert into reports (id, author_id, status, group_slug, agent_slug, condition_slug, concentration, fish_count, fish_lost, distress, condition_outcome)
    select 'loach-' || i, 'risk-author', 'accepted', 'loaches', 'hydrogen-peroxide', 'white-spot', 10 * i, 2, 0, 'mild', 'improved'
      from generate_series(1, 3) as i`);
  await recomputeGroupAgent(db, "loaches", "hydrogen-peroxide");
}, 120_000);

describe("GET /api/dose: the fitted chance that the planned dose goes badly", () => {
  it("answers the risk at the target with its interval, read from the group's fitted curve", async () => {
    const r = await get({ ...base, group: "tetras", target: 30 });
    expect(r.status).toBe(200);
    const fit = r.body.evidence.doseResponse;
    expect(fit.bmd).toBeGreaterThan(0);
    // Worked by hand from the answered fit: expit(a + b·log10 30), Wald on the linear predictor with
    // z = 1.959964 (the standard normal's 97.5 % point, any statistics table).
    const x = Math.log10(30);
    const eta = fit.a + fit.b * x;
    const se = Math.sqrt(fit.seA ** 2 + 2 * x * fit.covAB + x * x * fit.seB ** 2);
    const expit = (t: number) => 1 / (1 + Math.exp(-t));
    expect(r.body.risk.dose).toBe(30);
    expect(r.body.risk.risk).toBeCloseTo(expit(eta), 6);
    expect(r.body.risk.low).toBeCloseTo(expit(eta - 1.959964 * se), 5);
    expect(r.body.risk.high).toBeCloseTo(expit(eta + 1.959964 * se), 5);
    expect(r.body.risk).toMatchObject({ level: 95, extrapolated: false });
    // The data: 2 of 10 went badly at 20 mg/L and 4 of 10 at 40, so the fitted chance at 30 lies between them.
    expect(r.body.risk.risk).toBeGreaterThan(0.15);
    expect(r.body.risk.risk).toBeLessThan(0.45);
    expect(r.body.risk.low).toBeLessThan(r.body.risk.risk);
    expect(r.body.risk.high).toBeGreaterThan(r.body.risk.risk);
  });

  it("rises with the dose and says when the dose lies beyond the reported ones", async () => {
    const low = (await get({ ...base, group: "tetras", target: 10 })).body.risk;
    const high = (await get({ ...base, group: "tetras", target: 60 })).body.risk;
    expect(high.risk).toBeGreaterThan(low.risk);
    const beyond = (await get({ ...base, group: "tetras", target: 120 })).body.risk;
    expect(beyond.extrapolated).toBe(true);
  });

  it("reads the concentration the keeper's mL make when no target is given", async () => {
    // 20 mL of 3 % (30 mg/mL) in 40 L makes 15 mg/L.
    const r = await get({ ...base, group: "tetras", addedMl: 20 });
    expect(r.status).toBe(200);
    expect(r.body.risk.dose).toBeCloseTo(15, 9);
  });

  it("answers risk null where the group has no fitted curve, and no risk without a group", async () => {
    const sparse = await get({ ...base, group: "loaches", target: 20 });
    expect(sparse.status).toBe(200);
    expect(sparse.body.evidence.doseResponse.fit).toBeNull();
    expect(sparse.body.risk).toBeNull();
    const plain = await get({ ...base, target: 20 });
    expect(plain.body).not.toHaveProperty("risk");
  });
});
