import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import * as healthRoute from "@/app/api/health/route";
import * as catalogueRoute from "@/app/api/catalogue/route";
import * as membersRoute from "@/app/api/admin/members/route";
import sharp from "sharp";
import * as reportsRoute from "@/app/api/reports/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import { closeDb, getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
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

    const cat = await call(catalogueRoute.GET, "/api/catalogue");
    expect(cat.body.agents.find((a: { slug: string }) => a.slug === "hydrogen-peroxide")).toMatchObject({ unit: "mg/L" });

    const cookie = await signIn("admin@example.org", "pg-demo-password");
    const members = await call(membersRoute.GET, "/api/admin/members?role=moderator", { cookie });
    expect(members.status).toBe(200);
    expect(members.body.members.map((m: { email: string }) => m.email).sort()).toEqual(["keeper10@example.org", "moderator@example.org"]);
    const [admin] = await db.select().from(schema.users).where(eq(schema.users.email, "admin@example.org"));
    expect(admin?.role).toBe("admin");
  });

  it("holds the 12-photo limit when 20 uploads to one draft run at once on several connections", async () => {
    const cookie = await signIn("member@example.org", "pg-demo-password");
    const created = await call(reportsRoute.POST, "/api/reports", { body: reportBody({ speciesId: null, speciesOther: "An unlisted tetra" }), cookie });
    expect(created.status).toBe(201);
    const id = created.body.id as string;
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: "#1e6e5a" } }).jpeg().toBuffer();
    const upload = () => {
      const form = new FormData();
      form.set("file", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "tank.jpg");
      return photosRoute.POST(new Request(`${BASE}/api/reports/${id}/photos`, { method: "POST", body: form, headers: { cookie, origin: BASE } }), { params: Promise.resolve({ id }) });
    };
    const statuses = (await Promise.all(Array.from({ length: 20 }, upload))).map((r) => r.status);
    expect(statuses.filter((s) => s === 201)).toHaveLength(12);
    expect(statuses.filter((s) => s === 409)).toHaveLength(8);
    const [n] = await (await getDb()).select({ n: count() }).from(schema.photos).where(eq(schema.photos.reportId, id));
    expect(n?.n).toBe(12);
  });
});
