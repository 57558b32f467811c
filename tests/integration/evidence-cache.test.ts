import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as reportsRoute from "@/app/api/reports/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as summariesRoute from "@/app/api/summaries/route";
import * as catalogueKeyRoute from "@/app/api/admin/catalogue/[kind]/[key]/route";
import { closeDb, getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import {
  drainEvidenceOutbox,
  evidenceCacheVersion,
  recomputeGroupAgent,
  replacePairFigures,
} from "@/features/evidence/server";
import { resetAuthForTests } from "@/features/members/server/auth";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// The public evidence reads are cached by Next.js under a version (features/evidence/server/cache.ts). Under Vitest
// `'use cache'` is inert, so these tests check the version itself: it must change when a recompute commits (here and
// in another process on the same PostgreSQL server) and when the catalogue changes, and stay put otherwise.

type U = Awaited<ReturnType<typeof signedInUser>>;

async function acceptOne(member: U, moderator: U, dose: number): Promise<void> {
  const body = reportBody({
    speciesId: "corydoras-paleatus",
    treatment: { statedConcentration: dose, doses: 1 },
    submit: true,
  });
  delete body.treatment.amountMl;
  delete body.treatment.intervalHours;
  const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: member.cookie });
  expect(r.status).toBe(201);
  const d = await call(decisionRoute.POST, `/api/reports/${r.body.id}/decision`, {
    params: { id: r.body.id },
    cookie: moderator.cookie,
    body: { decision: "accept", note: "" },
  });
  expect(d.body.status).toBe("accepted");
}

const corydoras = async () => {
  const r = await call(summariesRoute.GET, "/api/summaries?agent=hydrogen-peroxide");
  return r.body.groups.find((g: { group: { slug: string } }) => g.group.slug === "corydoras");
};

describe("the evidence cache version (PGlite, one process)", () => {
  let member: U, moderator: U, admin: U;
  beforeAll(async () => {
    await seedCatalogue(await getDb());
    [member, moderator, admin] = [
      await signedInUser("member"),
      await signedInUser("moderator"),
      await signedInUser("admin"),
    ];
  });

  it("stays put while nothing changes, so the cache is used at all", async () => {
    expect(await evidenceCacheVersion()).toBe(await evidenceCacheVersion());
  });

  it("changes when a recompute commits, and the summaries then show the accepted report", async () => {
    const before = (await corydoras()).reports;
    const v0 = await evidenceCacheVersion();
    await acceptOne(member, moderator, 18);
    // Accepted, not yet recomputed: the figures have not moved, and neither has the version.
    expect(await evidenceCacheVersion()).toBe(v0);
    await drainEvidenceOutbox();
    const v1 = await evidenceCacheVersion();
    expect(v1).not.toBe(v0);
    expect((await corydoras()).reports).toBe(before + 1);
    // A direct recompute (scripts, benchmarks) moves it too.
    await recomputeGroupAgent(await getDb(), "corydoras", "hydrogen-peroxide");
    expect(await evidenceCacheVersion()).not.toBe(v1);
  });

  it("changes when an admin renames a group, even one without reports", async () => {
    const v0 = await evidenceCacheVersion();
    const r = await call(catalogueKeyRoute.PATCH, "/api/admin/catalogue/groups/plecos", {
      params: { kind: "groups", key: "plecos" },
      cookie: admin.cookie,
      body: { name: "Suckermouth catfish" },
    });
    expect(r.status).toBe(200);
    expect(await evidenceCacheVersion()).not.toBe(v0);
  });
});

describe("the evidence cache version across two processes on one PostgreSQL server", () => {
  let stopPg: () => void = () => {};
  let url = "";
  let child: ChildProcess | undefined;
  let out = "";

  beforeAll(async () => {
    if (!hasPostgresServer()) throw new Error("initdb and pg_ctl are needed on PATH (apt-get install -y postgresql).");
    await closeDb();
    resetAuthForTests();
    const pg = await startPostgres();
    stopPg = pg.stop;
    url = pg.url;
    process.env.DATABASE_URL = url;
    await seedCatalogue(await getDb());
  }, 120_000);

  afterAll(async () => {
    child?.kill("SIGKILL");
    await closeDb();
    delete process.env.DATABASE_URL;
    resetAuthForTests();
    stopPg();
  });

  /** Waits until process B has printed a line matching `re` after offset `from` of its output. */
  const waitFor = async (re: RegExp, from: number, ms: number) => {
    const start = Date.now();
    while (Date.now() - start < ms) {
      const m = out.slice(from).match(re);
      if (m) return { match: m, after: Date.now() - start };
      await new Promise((r) => setTimeout(r, 10));
    }
    throw new Error(`process B printed no ${re} within ${ms} ms:\n${out}`);
  };

  it("process B's version changes within a second of a recompute committed by process A, by NOTIFY alone", async () => {
    const root = process.cwd();
    child = spawn(
      process.execPath,
      ["--conditions=react-server", "--import", "tsx", path.join(root, "tests/support/evidence-cache-child.ts")],
      {
        cwd: root,
        env: {
          ...process.env,
          DATABASE_URL: url,
          BETTER_AUTH_SECRET: "evidence-cache-test-secret-0123456789",
          BETTER_AUTH_URL: "http://localhost:3000",
        },
        stdio: ["ignore", "pipe", "pipe"],
      },
    );
    child.stdout!.on("data", (d) => (out += d));
    child.stderr!.on("data", (d) => (out += d));
    await waitFor(/listening\nversion (\S+)\n/, 0, 60_000);
    await new Promise((r) => setTimeout(r, 200));
    const mark = out.length;
    const before = out.slice(0, mark).trim().split("\n").at(-1)!.replace("version ", "");

    // Process A (this one) stores a pair's figures in a transaction of its own: no local bump reaches B, only the
    // NOTIFY sent inside that transaction.
    const db = await getDb();
    await db.transaction(async (tx) => {
      await replacePairFigures(tx, "corydoras", "hydrogen-peroxide", { confidenceLevel: 95, minReports: 5 });
    });
    const { match, after } = await waitFor(/version (\S+)\n/, mark, 2_000);
    expect(match[1]).not.toBe(before);
    expect(after).toBeLessThan(1_000);

    // A transaction that rolls back announces nothing.
    const mark2 = out.length;
    await db
      .transaction(async (tx) => {
        await replacePairFigures(tx, "corydoras", "hydrogen-peroxide", { confidenceLevel: 95, minReports: 5 });
        throw new Error("roll back");
      })
      .catch(() => undefined);
    await new Promise((r) => setTimeout(r, 500));
    expect(out.slice(mark2)).not.toMatch(/version/);
  }, 120_000);
});
