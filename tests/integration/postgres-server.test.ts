import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, count, eq } from "drizzle-orm";
import * as healthRoute from "@/app/api/health/route";
import * as catalogueRoute from "@/app/api/catalogue/route";
import * as membersRoute from "@/app/api/admin/members/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { seedDemo } from "@/db/seed";
import { drainEvidenceOutbox } from "@/features/evidence/server";
import * as authRoute from "@/app/api/auth/[...all]/route";
import { resetAuthForTests } from "@/features/members/server/auth";
import sharp from "sharp";
import * as reportsRoute from "@/app/api/reports/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import { closeDb, getDb, schema } from "@/db/client";
import { BASE, call } from "../support/http";
import { reportBody, signIn } from "../support/factories";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// The same schema, migrations, queries and auth on a real PostgreSQL server. Its binaries come
// with the machine (platform.md) and .ci/run installs them where absent.
describe("on a PostgreSQL server (DATABASE_URL)", () => {
  let stop: () => void = () => {};

  beforeAll(async () => {
    if (!hasPostgresServer()) throw new Error("initdb and pg_ctl are needed on PATH (apt-get install -y postgresql).");
    const pg = await startPostgres();
    stop = pg.stop;
    process.env.DATABASE_URL = pg.url;
  });

  afterAll(async () => {
    await closeDb();
    delete process.env.DATABASE_URL;
    stop();
  });

  it("applies the migrations and reports postgres on /api/health", async () => {
    const r = await call(healthRoute.GET, "/api/health");
    expect(r).toMatchObject({ status: 200, body: { status: "ok", database: "postgres" } });
  });

  it("seeds the demo club and serves the catalogue and admin routes with the same code", async () => {
    const db = await getDb();
    const first = await seedDemo(db, { password: "pg-demo-password" });
    expect(first.reportsCreated).toBe(150);
    const again = await seedDemo(db, { password: "pg-demo-password" });
    expect(again.reportsCreated).toBe(0);
    const [n] = await db.select({ n: count() }).from(schema.reports);
    expect(n?.n).toBe(150);

    // The dose–response aggregate's arrays come back through node-postgres too: the demo's tetras get a fit.
    const [tetras] = await db
      .select()
      .from(schema.evidenceSummaries)
      .where(
        and(
          eq(schema.evidenceSummaries.groupSlug, "tetras"),
          eq(schema.evidenceSummaries.agentSlug, "hydrogen-peroxide"),
          eq(schema.evidenceSummaries.conditionSlug, ""),
        ),
      );
    const dr = (tetras?.summary as { doseResponse: { bmd: number; bmdl: number; curve: unknown[] } }).doseResponse;
    expect(dr.bmdl).toBeLessThan(dr.bmd);
    expect(dr.curve).toHaveLength(50);

    const cat = await call(catalogueRoute.GET, "/api/catalogue");
    expect(cat.body.agents.find((a: { slug: string }) => a.slug === "hydrogen-peroxide")).toMatchObject({
      unit: "mg/L",
    });

    const cookie = await signIn("admin@example.org", "pg-demo-password");
    const members = await call(membersRoute.GET, "/api/admin/members?role=moderator", { cookie });
    expect(members.status).toBe(200);
    expect(members.body.members.map((m: { email: string }) => m.email).sort()).toEqual([
      "keeper10@example.org",
      "moderator@example.org",
    ]);
    const [admin] = await db.select().from(schema.users).where(eq(schema.users.email, "admin@example.org"));
    expect(admin?.role).toBe("admin");
  });

  it("accepts waiting reports in parallel and the drained summaries count every accepted report", async () => {
    const db = await getDb();
    const waiting = await db
      .select({ id: schema.reports.id, authorId: schema.reports.authorId })
      .from(schema.reports)
      .where(eq(schema.reports.status, "awaiting_review"));
    expect(waiting.length).toBeGreaterThan(1);
    const [mod, admin] = [
      await signIn("moderator@example.org", "pg-demo-password"),
      await signIn("admin@example.org", "pg-demo-password"),
    ];
    const answers = await Promise.all(
      waiting.map((r, i) =>
        call(decisionRoute.POST, `/api/reports/${r.id}/decision`, {
          params: { id: r.id },
          cookie: i % 2 ? mod : admin,
          body: { decision: "accept" },
        }),
      ),
    );
    const accepted = answers.filter((a) => a.status === 200).length;
    expect(accepted).toBeGreaterThan(0); // a demo account's own report answers 403; every other is accepted
    await drainEvidenceOutbox();
    const [left] = await db.select({ n: count() }).from(schema.evidenceOutbox);
    expect(left?.n).toBe(0);
    const counts = await db
      .select({ group: schema.reports.groupSlug, agent: schema.reports.agentSlug, n: count() })
      .from(schema.reports)
      .where(eq(schema.reports.status, "accepted"))
      .groupBy(schema.reports.groupSlug, schema.reports.agentSlug);
    const stored = await db
      .select({
        group: schema.evidenceSummaries.groupSlug,
        agent: schema.evidenceSummaries.agentSlug,
        n: schema.evidenceSummaries.reports,
      })
      .from(schema.evidenceSummaries)
      .where(eq(schema.evidenceSummaries.conditionSlug, ""));
    const key = (x: { group: string | null; agent: string | null; n: number }) => `${x.group}/${x.agent}/${x.n}`;
    expect(stored.map(key).sort()).toEqual(counts.map(key).sort());
  });

  it("keeps both sign-in limits in the server's tables", async () => {
    process.env.RATE_LIMIT = "on";
    process.env.TRUSTED_PROXY_HOPS = "1";
    resetAuthForTests();
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 11; i++) {
        const r = await call(authRoute.POST, "/api/auth/sign-in/email", {
          body: { email: "member2@example.org", password: `wrong-password-${i}` },
          headers: { "x-forwarded-for": `198.51.100.${i + 1}` },
        });
        statuses.push(r.status);
      }
      expect(statuses).toEqual([...Array(10).fill(401), 429]);
      const db = await getDb();
      const [limit] = await db
        .select()
        .from(schema.signInLimits)
        .where(eq(schema.signInLimits.email, "member2@example.org"));
      expect(limit?.lockedUntil).toBeInstanceOf(Date);
      const [counted] = await db.select({ n: count() }).from(schema.rateLimits);
      expect(counted?.n).toBeGreaterThanOrEqual(10);
    } finally {
      process.env.RATE_LIMIT = "off";
      delete process.env.TRUSTED_PROXY_HOPS;
      resetAuthForTests();
    }
  });

  it("holds the 12-photo limit when 20 uploads to one draft run at once on several connections", async () => {
    const cookie = await signIn("member@example.org", "pg-demo-password");
    const created = await call(reportsRoute.POST, "/api/reports", {
      body: reportBody({ speciesId: null, speciesOther: "An unlisted tetra" }),
      cookie,
    });
    expect(created.status).toBe(201);
    const id = created.body.id as string;
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#1e6e5a" } })
      .jpeg()
      .toBuffer();
    const upload = () => {
      const form = new FormData();
      form.set("file", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "tank.jpg");
      return photosRoute.POST(
        new Request(`${BASE}/api/reports/${id}/photos`, {
          method: "POST",
          body: form,
          headers: { cookie, origin: BASE },
        }),
        { params: Promise.resolve({ id }) },
      );
    };
    const statuses = (await Promise.all(Array.from({ length: 20 }, upload))).map((r) => r.status);
    expect(statuses.filter((s) => s === 201)).toHaveLength(12);
    expect(statuses.filter((s) => s === 409)).toHaveLength(8);
    const [n] = await (await getDb()).select({ n: count() }).from(schema.photos).where(eq(schema.photos.reportId, id));
    expect(n?.n).toBe(12);
  });
});
