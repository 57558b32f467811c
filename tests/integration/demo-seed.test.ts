import { describe, expect, it } from "vitest";
import { count, eq, sql } from "drizzle-orm";
import * as openapiRoute from "@/app/api/openapi.json/route";
import * as catalogueRoute from "@/app/api/catalogue/route";
import { getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { call } from "../support/http";
import { signIn } from "../support/factories";

describe("the demo club", () => {
  it("seeds invented accounts on example.org and 150 demo reports across every status, once", async () => {
    const db = await getDb();
    const first = await seedDemo(db, { password: "demo-pass-for-test" });
    expect(first.reportsCreated).toBe(150);
    const second = await seedDemo(db, { password: "demo-pass-for-test" });
    expect(second.reportsCreated).toBe(0);

    const users = await db.select().from(schema.users);
    expect(users.length).toBe(12);
    expect(users.every((u) => u.email.endsWith("@example.org") && u.isDemo && u.emailVerified)).toBe(true);

    const byStatus = await db
      .select({ status: schema.reports.status, n: count() })
      .from(schema.reports)
      .groupBy(schema.reports.status);
    expect(Object.fromEntries(byStatus.map((r) => [r.status, r.n]))).toEqual({
      accepted: 110,
      awaiting_review: 14,
      draft: 10,
      declined: 6,
      returned: 5,
      retracted: 5,
    });
    const notDemo = await db
      .select({ n: count() })
      .from(schema.reports)
      .where(sql`${schema.reports.source} <> 'demo' or ${schema.reports.notes} not like 'Demo report%'`);
    expect(notDemo[0]?.n).toBe(0);

    // Every report has a trail that ends in its status.
    const lastEvents = await db.execute(sql`
      select r.status, e.to_status from reports r
      join lateral (select to_status from report_events where report_id = r.id order by at desc, id desc limit 1) e on true`);
    const rows = (lastEvents as unknown as { rows: { status: string; to_status: string }[] }).rows;
    expect(rows).toHaveLength(150);
    expect(rows.every((r) => r.status === r.to_status)).toBe(true);
  });

  it("lets each demo role sign in with the demo password", async () => {
    for (const email of ["admin@example.org", "moderator@example.org", "member@example.org", "member2@example.org"]) {
      expect(await signIn(email, "demo-pass-for-test")).toMatch(/better-auth\.session_token=/);
    }
  });

  it("re-seeding with another DEMO_PASSWORD makes that the demo password", async () => {
    const db = await getDb();
    await seedDemo(db, { password: "another-demo-pass", reports: false });
    expect(await signIn("member@example.org", "another-demo-pass")).toMatch(/session_token/);
    await expect(signIn("member@example.org", "demo-pass-for-test")).rejects.toThrow(/401/);
  });

  it("serves the starter catalogue with hydrogen peroxide as agent hydrogen-peroxide in mg/L", async () => {
    const r = await call(catalogueRoute.GET, "/api/catalogue");
    expect(r.status).toBe(200);
    expect(r.body.speciesGroups.length).toBeGreaterThanOrEqual(12);
    expect(r.body.species.length).toBeGreaterThanOrEqual(60);
    const h2o2 = r.body.agents.find((a: { slug: string }) => a.slug === "hydrogen-peroxide");
    expect(h2o2.unit).toBe("mg/L");
    expect(h2o2.stockForms.map((s: { percent: number }) => s.percent)).toEqual([3, 6, 12, 35]);
    const db = await getDb();
    const [club] = await db.select().from(schema.clubSettings).where(eq(schema.clubSettings.id, 1));
    expect(club?.name).toMatch(/demo club/);
  });

  it("publishes an OpenAPI 3.1 document generated from the request schemas", async () => {
    const r = await call(openapiRoute.GET, "/api/openapi.json");
    expect(r.body.openapi).toBe("3.1.0");
    const patch = r.body.paths["/api/admin/members/{id}"].patch;
    expect(patch.requestBody.content["application/json"].schema.properties.role.enum).toEqual([
      "member",
      "moderator",
      "admin",
    ]);
    const list = r.body.paths["/api/admin/members"].get;
    expect(list.parameters.find((p: { name: string }) => p.name === "pageSize").schema.maximum).toBe(100);
  });
});
