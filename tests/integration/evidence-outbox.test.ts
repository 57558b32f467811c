import { beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { quantileSorted } from "simple-statistics";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as correctionsRoute from "@/app/api/reports/[id]/corrections/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import * as catalogueKeyRoute from "@/app/api/admin/catalogue/[kind]/[key]/route";
import { getDb } from "@/db/client";
import { seedCatalogue, updateClubSettings } from "@/features/catalogue/server";
import { drainEvidenceOutbox, startEvidenceWorker, stopEvidenceWorker } from "@/features/evidence/server";
import type { SummaryDetail } from "@/features/evidence/summary";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let members: U[], mod1: U, mod2: U, admin: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  members = [await signedInUser("member"), await signedInUser("member"), await signedInUser("member")];
  [mod1, mod2, admin] = [await signedInUser("moderator"), await signedInUser("moderator"), await signedInUser("admin")];
});

const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;
const outbox = async () =>
  rowsOf<{ group_slug: string; agent_slug: string }>(
    await (await getDb()).execute(sql`select group_slug, agent_slug from evidence_outbox order by id`),
  );

interface Spec {
  dose: number;
  lost?: number;
  cause?: "treatment" | "disease" | "unknown";
  severe?: boolean;
  cleared?: boolean;
  fish?: number;
}

/** A submitted corydoras report dosed by stated concentration, so its dose is exactly `dose`. */
async function submitted(author: U, s: Spec) {
  const body = reportBody({
    speciesId: "corydoras-paleatus",
    fishCount: s.fish ?? 5,
    treatment: { statedConcentration: s.dose, doses: 1 },
    outcome: {
      fishLost: s.lost ?? 0,
      lossCause: s.lost ? (s.cause ?? "treatment") : null,
      distress: s.severe ? "severe" : "mild",
      condition: s.cleared ? "cleared" : "improved",
    },
    submit: true,
  });
  delete body.treatment.amountMl;
  delete body.treatment.intervalHours;
  const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: author.cookie });
  expect(r.status).toBe(201);
  return r.body.id as string;
}

const decide = (id: string, by: U, decision: string, note = "") =>
  call(decisionRoute.POST, `/api/reports/${id}/decision`, {
    params: { id },
    cookie: by.cookie,
    body: { decision, note },
  });

const detail = async () =>
  (
    await call(summaryRoute.GET, "/api/summaries/corydoras?agent=hydrogen-peroxide", {
      params: { groupSlug: "corydoras" },
    })
  ).body;

// ---- An independent recompute, from the accepted rows, written from docs/statistics.md without the app's code. ----

/** z₀.₉₇₅ of the standard normal distribution (tabulated, e.g. R's qnorm(0.975) = 1.959963984540054; from memory). */
const Z95 = 1.959963984540054;

/** Wilson (1927) score interval, no continuity correction; the exact edges 0 and 1 at k = 0 and k = n. */
function wilsonRef(k: number, n: number) {
  const p = k / n;
  const centre = (p + (Z95 * Z95) / (2 * n)) / (1 + (Z95 * Z95) / n);
  const half = (Z95 / (1 + (Z95 * Z95) / n)) * Math.sqrt((p * (1 - p)) / n + (Z95 * Z95) / (4 * n * n));
  return { value: p, low: k === 0 ? 0 : centre - half, high: k === n ? 1 : centre + half };
}

/** P(B ≤ j) for B ~ Binomial(n, ½), exactly, from integer binomial coefficients. */
function binomHalfCdf(n: number, j: number): number {
  let c = 1n;
  let sum = 0n;
  for (let i = 0; i <= j; i++) {
    sum += c;
    c = (c * BigInt(n - i)) / BigInt(i + 1);
  }
  return Number(sum) / 2 ** n;
}

interface Row {
  dose: number;
  fishLost: number;
  lossCause: string | null;
  distress: string;
  outcome: string;
  author: string;
  fish: number;
}

function reference(rows: Row[], edges: number[]) {
  const tolerated = (r: Row) =>
    !(r.fishLost > 0 && (r.lossCause === "treatment" || r.lossCause === "unknown" || r.lossCause === null)) &&
    r.distress !== "severe";
  const tol = rows
    .filter(tolerated)
    .map((r) => r.dose)
    .sort((a, b) => a - b);
  const adverse = rows.filter((r) => !tolerated(r)).map((r) => r.dose);
  // Largest r with P(B ≤ r − 1) ≤ α/2 (Campbell & Gardner's distribution-free interval for the median).
  let r = 0;
  while (r + 1 <= Math.floor(tol.length / 2) + 1 && binomHalfCdf(tol.length, r) <= 0.025) r++;
  const q = (p: number) => quantileSorted(tol, p); // simple-statistics: Hyndman & Fan type 7
  return {
    reports: rows.length,
    members: new Set(rows.map((x) => x.author)).size,
    fish: rows.reduce((s, x) => s + x.fish, 0),
    tolerated: tol.length,
    toleratedShare: wilsonRef(tol.length, rows.length),
    toleratedDose: { min: q(0), p10: q(0.1), p25: q(0.25), median: q(0.5), p75: q(0.75), p90: q(0.9), max: q(1) },
    medianInterval:
      r >= 1
        ? { low: tol[r - 1]!, high: tol[tol.length - r]!, coverage: 1 - 2 * binomHalfCdf(tol.length, r - 1) }
        : null,
    lowestAdverseDose: adverse.length ? Math.min(...adverse) : null,
    bands: edges.map((from, i) => {
      const to = edges[i + 1] ?? Infinity;
      const inBand = rows.filter((x) => x.dose >= from && x.dose < to);
      return {
        from,
        reports: inBand.length,
        tolerated: inBand.filter(tolerated).length,
        cleared: inBand.filter((x) => x.outcome === "cleared").length,
      };
    }),
  };
}

async function acceptedRows(): Promise<Row[]> {
  const rows = rowsOf<Record<string, unknown>>(
    await (
      await getDb()
    ).execute(sql`select concentration, fish_lost, loss_cause, distress, condition_outcome, author_id, fish_count
                                        from reports where status = 'accepted' and group_slug = 'corydoras' and agent_slug = 'hydrogen-peroxide'`),
  );
  return rows.map((x) => ({
    dose: Number(x.concentration),
    fishLost: Number(x.fish_lost),
    lossCause: x.loss_cause as string | null,
    distress: String(x.distress),
    outcome: String(x.condition_outcome),
    author: String(x.author_id),
    fish: Number(x.fish_count),
  }));
}

function expectEqualToReference(s: SummaryDetail, ref: ReturnType<typeof reference>) {
  expect(s).toMatchObject({
    reports: ref.reports,
    members: ref.members,
    fish: ref.fish,
    tolerated: ref.tolerated,
    lowestAdverseDose: ref.lowestAdverseDose,
  });
  expect(s.toleratedShare.value).toBe(ref.toleratedShare.value);
  expect(s.toleratedShare.low).toBeCloseTo(ref.toleratedShare.low, 12);
  expect(s.toleratedShare.high).toBeCloseTo(ref.toleratedShare.high, 12);
  for (const k of ["min", "p10", "p25", "median", "p75", "p90", "max"] as const)
    expect(s.toleratedDose[k]).toBeCloseTo(ref.toleratedDose[k], 10);
  expect(s.toleratedDose.medianInterval).toEqual(ref.medianInterval);
  for (const b of ref.bands) {
    const got = s.bands.find((x: { from: number }) => x.from === b.from) ?? { reports: 0, tolerated: 0, cleared: 0 };
    expect({ from: b.from, reports: got.reports, tolerated: got.tolerated, cleared: got.cleared }).toEqual(b);
  }
}

// Twelve courses: tolerated ones, one lost to disease (still tolerated), one severe, one lost to the treatment, one unknown cause.
const twelve: Spec[] = [
  { dose: 8 },
  { dose: 12.5, cleared: true },
  { dose: 15 },
  { dose: 18.2, cleared: true },
  { dose: 20, lost: 1, cause: "disease" },
  { dose: 22.5, cleared: true },
  { dose: 25, fish: 9 },
  { dose: 27.5, severe: true },
  { dose: 30, cleared: true },
  { dose: 33.3 },
  { dose: 36, lost: 2, cause: "treatment" },
  { dose: 41, lost: 1, cause: "unknown", fish: 3 },
];

describe("recompute through the evidence outbox", () => {
  it("counts twelve reports accepted in parallel by two moderators, equal to an independent recompute, and empties the outbox", async () => {
    const ids = [];
    for (const [i, spec] of twelve.entries()) ids.push(await submitted(members[i % 3]!, spec));
    const answers = await Promise.all(ids.map((id, i) => decide(id, i % 2 ? mod2 : mod1, "accept")));
    expect(answers.map((a) => a.status)).toEqual(Array(12).fill(200));
    expect(answers.every((a) => a.body.status === "accepted")).toBe(true);
    // Each accept recorded its pair in its own transaction.
    expect(
      (await outbox()).filter((p) => p.group_slug === "corydoras" && p.agent_slug === "hydrogen-peroxide"),
    ).toHaveLength(12);

    const drained = await drainEvidenceOutbox();
    expect(drained).toMatchObject({ recomputed: 1, failed: 0 });
    expect(await outbox()).toEqual([]);

    const s = await detail();
    expect(s.reports).toBe(12);
    const edges = s.bands.map((b: { from: number }) => b.from);
    expect(edges).toEqual([0, 10, 20, 30, 40, 50, 60, 80]);
    expectEqualToReference(s, reference(await acceptedRows(), [...edges, 100]));
    // By hand for this fixture: tolerated 8, 12.5, 15, 18.2, 20, 22.5, 25, 30, 33.3 (n = 9); median x₍₅₎ = 20;
    // r = 2 (P(B ≤ 1) = 10/512 ≤ 0.025 < P(B ≤ 2) = 46/512), so (x₍₂₎, x₍₈₎) = (12.5, 30), coverage 1 − 20/512.
    expect(s.tolerated).toBe(9);
    expect(s.toleratedDose.median).toBe(20);
    expect(s.toleratedDose.medianInterval).toEqual({ low: 12.5, high: 30, coverage: 1 - 20 / 512 });
    expect(s.lowestAdverseDose).toBe(27.5);
  });

  it("keeps a committed change and its outbox row when the recompute fails, and retries it", async () => {
    const db = await getDb();
    const id = await submitted(members[0]!, { dose: 16, cleared: true });
    // Make every write of summaries fail, as a broken disk or a bug in the recompute would.
    await db.execute(
      sql.raw(
        `create function tanklore_test_refuse() returns trigger language plpgsql as $$ begin raise exception 'summaries refused by the test'; end $$`,
      ),
    );
    await db.execute(
      sql.raw(
        `create trigger refuse_summaries before insert on evidence_summaries for each row execute function tanklore_test_refuse()`,
      ),
    );

    const d = await decide(id, mod2, "accept");
    expect(d.status).toBe(200);
    expect(d.body).toEqual({ id, status: "accepted" });
    const failed = await drainEvidenceOutbox();
    expect(failed).toMatchObject({ recomputed: 0, failed: 1 });
    const [row] = rowsOf<{ status: string }>(await db.execute(sql`select status from reports where id = ${id}`));
    expect(row!.status).toBe("accepted");
    expect(await outbox()).toEqual([{ group_slug: "corydoras", agent_slug: "hydrogen-peroxide" }]);
    // The failed transaction rolled back whole: the previous figures are still served.
    expect((await detail()).reports).toBe(12);

    await db.execute(sql.raw(`drop trigger refuse_summaries on evidence_summaries`));
    expect(await drainEvidenceOutbox()).toMatchObject({ recomputed: 1, failed: 0 });
    expect(await outbox()).toEqual([]);
    const s = await detail();
    expect(s.reports).toBe(13);
    expectEqualToReference(s, reference(await acceptedRows(), [0, 10, 20, 30, 40, 50, 60, 80, 100]));
  });

  it("records the pairs of a retract, a correction, a band-edge change and a settings change with the change itself", async () => {
    const db = await getDb();
    const [first] = rowsOf<{ id: string }>(
      await db.execute(sql`select id from reports where status = 'accepted' and concentration = 41`),
    );
    const corrected = await call(correctionsRoute.POST, `/api/reports/${first!.id}/corrections`, {
      params: { id: first!.id },
      cookie: mod1.cookie,
      body: { kind: "lossCause", lossCause: "disease", note: "The member wrote in: the fish had dropsy." },
    });
    expect(corrected.status).toBe(200);
    expect(await outbox()).toEqual([{ group_slug: "corydoras", agent_slug: "hydrogen-peroxide" }]);
    await drainEvidenceOutbox();
    // Lost to disease counts as tolerated: one more tolerated report, and the highest tolerated dose is now 41.
    expect(await detail()).toMatchObject({ tolerated: 11, toleratedDose: { max: 41 } });

    const retracted = await decide(first!.id, mod2, "retract", "Entered twice.");
    expect(retracted.body.status).toBe("retracted");
    expect(await outbox()).toHaveLength(1);
    await drainEvidenceOutbox();
    expect(await detail()).toMatchObject({ reports: 12, tolerated: 10 });

    const edges = await call(catalogueKeyRoute.PATCH, "/api/admin/catalogue/agents/hydrogen-peroxide", {
      method: "PATCH",
      params: { kind: "agents", key: "hydrogen-peroxide" },
      cookie: admin.cookie,
      body: { bandEdges: [0, 15, 30, 60, 100] },
    });
    expect(edges.status).toBe(200);
    expect(await outbox()).toEqual([{ group_slug: "corydoras", agent_slug: "hydrogen-peroxide" }]);
    await drainEvidenceOutbox();
    expect((await detail()).bands.map((b: { from: number }) => b.from)).toEqual([0, 15, 30, 60]);

    await updateClubSettings(
      { id: admin.id, name: admin.name, email: admin.email, role: "admin" },
      {
        name: "Test club",
        confidenceLevel: 90,
        minReports: 5,
        defaultVolumeUnit: "L",
        defaultTemperatureUnit: "C",
        firstDoseFraction: 0.5,
      },
    );
    expect(await outbox()).toEqual([{ group_slug: "corydoras", agent_slug: "hydrogen-peroxide" }]);
    await drainEvidenceOutbox();
    expect((await detail()).confidenceLevel).toBe(90);
    const [stored] = rowsOf<{ confidence_level: number }>(
      await db.execute(
        sql`select confidence_level from evidence_summaries where group_slug = 'corydoras' and condition_slug = ''`,
      ),
    );
    expect(stored!.confidence_level).toBe(90);
  });

  it("with the worker running, serves the new figures within a second of the commit and picks up rows another process left", async () => {
    startEvidenceWorker(200);
    try {
      const id = await submitted(members[1]!, { dose: 19, cleared: true });
      const before = (await detail()).reports;
      const d = await decide(id, mod1, "accept");
      const committed = Date.now();
      expect(d.body.status).toBe("accepted");
      let s = await detail();
      while (s.reports !== before + 1 && Date.now() - committed < 5_000) {
        await new Promise((r) => setTimeout(r, 25));
        s = await detail();
      }
      expect(s.reports).toBe(before + 1);
      expect(Date.now() - committed).toBeLessThan(1_000);

      // A row written without waking this process (another process's change, or one left by a crash): the poll drains it.
      await (
        await getDb()
      ).execute(sql`insert into evidence_outbox (group_slug, agent_slug) values ('corydoras', 'hydrogen-peroxide')`);
      const left = Date.now();
      while ((await outbox()).length && Date.now() - left < 5_000) await new Promise((r) => setTimeout(r, 25));
      expect(await outbox()).toEqual([]);
      expect(Date.now() - left).toBeLessThan(1_000);
    } finally {
      stopEvidenceWorker();
    }
  });
});
