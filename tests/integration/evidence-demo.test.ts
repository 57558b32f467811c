import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import * as summariesRoute from "@/app/api/summaries/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import { getDb } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { call } from "../support/http";

// The test's own code path: raw rows from the database, statistics written here independently.
const Z95 = 1.959963984540054; // NIST/SEMATECH e-Handbook 1.3.6.7.1: z(0.975) = 1.95996
const wilson = (k: number, n: number) => {
  const p = k / n,
    z2 = Z95 * Z95;
  const c = (p + z2 / (2 * n)) / (1 + z2 / n);
  const h = (Z95 / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  return [c - h, c + h];
};
const q7 = (s: number[], p: number) => {
  const j = Math.floor((s.length - 1) * p),
    g = (s.length - 1) * p - j;
  return j + 1 < s.length ? s[j]! + g * (s[j + 1]! - s[j]!) : s[j]!;
};
const binomCdf = (n: number, k: number) => {
  let c = 1n,
    sum = 0n;
  for (let i = 0; i <= k; i++) {
    sum += c;
    c = (c * BigInt(n - i)) / BigInt(i + 1);
  }
  return Number((sum * 10n ** 18n) / 2n ** BigInt(n)) / 1e18;
};

interface Raw {
  group_slug: string;
  author_id: string;
  fish_count: number;
  concentration: number;
  fish_lost: number;
  loss_cause: string | null;
  distress: string;
}

beforeAll(async () => {
  await seedDemo(await getDb(), { password: "demo-password-evidence" });
});

describe("the demo club's summaries", () => {
  it("equal figures computed independently from the accepted reports", async () => {
    const db = await getDb();
    const raw = (await db.execute(
      sql`select group_slug, author_id, fish_count, concentration, fish_lost, loss_cause, distress from reports where status = 'accepted' and agent_slug = 'hydrogen-peroxide'`,
    )) as unknown as { rows: Raw[] };
    const byGroup = new Map<string, Raw[]>();
    for (const r of raw.rows) byGroup.set(r.group_slug, [...(byGroup.get(r.group_slug) ?? []), r]);
    expect(byGroup.size).toBeGreaterThanOrEqual(8);

    const list = await call(summariesRoute.GET, "/api/summaries?agent=hydrogen-peroxide");
    let checked = 0;
    for (const g of list.body.groups) {
      const rows = byGroup.get(g.group.slug) ?? [];
      expect(g.reports, g.group.slug).toBe(rows.length);
      if (!rows.length) continue;
      const tol = rows.filter(
        (r) =>
          !(r.fish_lost > 0 && ["treatment", "unknown"].includes(r.loss_cause ?? "unknown")) && r.distress !== "severe",
      );
      const adverse = rows.filter((r) => !tol.includes(r));
      expect(g.members).toBe(new Set(rows.map((r) => r.author_id)).size);
      expect(g.fish).toBe(rows.reduce((s, r) => s + r.fish_count, 0));
      expect(g.tolerated).toBe(tol.length);
      const [lo, hi] = wilson(tol.length, rows.length);
      expect(g.toleratedShare.low).toBeCloseTo(lo!, 10);
      expect(g.toleratedShare.high).toBeCloseTo(hi!, 10);
      expect(g.lowestAdverseDose).toBe(adverse.length ? Math.min(...adverse.map((r) => r.concentration)) : null);
      const s = tol.map((r) => r.concentration).sort((x, y) => x - y);
      if (s.length) {
        expect(g.toleratedDose.median).toBeCloseTo(q7(s, 0.5), 9);
        expect(g.toleratedDose.p25).toBeCloseTo(q7(s, 0.25), 9);
        expect(g.toleratedDose.p90).toBeCloseTo(q7(s, 0.9), 9);
        let r = 0;
        while (r + 1 <= s.length / 2 && binomCdf(s.length, r) <= 0.025) r += 1;
        if (r === 0) expect(g.toleratedDose.medianInterval).toBeNull();
        else {
          expect(g.toleratedDose.medianInterval.low).toBe(s[r - 1]);
          expect(g.toleratedDose.medianInterval.high).toBe(s[s.length - r]);
          expect(g.toleratedDose.medianInterval.coverage).toBeCloseTo(1 - 2 * binomCdf(s.length, r - 1), 10);
        }
      }
      expect(g.sparse).toBe(rows.length < 5);
      checked += 1;
    }
    expect(checked).toBeGreaterThanOrEqual(8);
  });

  it("gives each group's chart one point per accepted report", async () => {
    const r = await call(summaryRoute.GET, "/api/summaries/livebearers?agent=hydrogen-peroxide", {
      params: { groupSlug: "livebearers" },
    });
    expect(r.body.points.length).toBe(r.body.reports);
    expect(r.body.bands.reduce((s: number, b: { reports: number }) => s + b.reports, 0)).toBe(r.body.reports);
  });
});
