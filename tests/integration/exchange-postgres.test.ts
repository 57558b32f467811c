import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import Papa from "papaparse";
import * as exportRoute from "@/app/api/export/reports.csv/route";
import * as importRoute from "@/app/api/import/reports/route";
import * as reportsRoute from "@/app/api/reports/route";
import { closeDb, getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { call } from "../support/http";
import { reportBody, signIn, signedInUser } from "../support/factories";
import { hasPostgresServer, startPostgres } from "../support/pg-server";

// The exchange and Idempotency-Key on a PostgreSQL server, where concurrent requests really run at once
// (PGlite serialises every transaction in one process).
describe("exchange and Idempotency-Key on a PostgreSQL server", () => {
  let stop: () => void = () => {};
  let admin = "";

  beforeAll(async () => {
    if (!hasPostgresServer()) throw new Error("initdb and pg_ctl are needed on PATH (apt-get install -y postgresql).");
    const pg = await startPostgres();
    stop = pg.stop;
    process.env.DATABASE_URL = pg.url;
    await seedDemo(await getDb(), { password: "pg-exchange-pass" });
    admin = await signIn("admin@example.org", "pg-exchange-pass");
  }, 120_000);

  afterAll(async () => {
    await closeDb();
    delete process.env.DATABASE_URL;
    stop();
  });

  it("creates one report for the same key sent eight times at once", async () => {
    const member = await signedInUser("member");
    const answers = await Promise.all(
      Array.from({ length: 8 }, () =>
        call(reportsRoute.POST, "/api/reports", {
          cookie: member.cookie,
          body: reportBody({ submit: true }),
          headers: { "idempotency-key": "pg-parallel" },
        }),
      ),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(8).fill(201));
    expect(new Set(answers.map((a) => a.body.id)).size).toBe(1);
    const db = await getDb();
    const [n] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.authorId, member.id));
    expect(n!.n).toBe(1);
  });

  it("skips every row of its own export, also when the same file is imported twice at once", async () => {
    const csv = (await call(exportRoute.GET, "/api/export/reports.csv", { cookie: admin })).body as string;
    const rows = Papa.parse(csv, { header: true, comments: "#", skipEmptyLines: true }).data.length;
    const again = await call(importRoute.POST, "/api/import/reports", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "text/csv" },
    });
    expect(again.body).toMatchObject({ imported: 0, skipped: rows, rejected: [] });

    // A new file without ids, sent twice in parallel: the rows go in once.
    const header =
      "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after";
    const file = [
      header,
      ...Array.from(
        { length: 40 },
        (_, n) =>
          `accepted,member-pg${n},poecilia-reticulata,${3 + n},adult,white-spot,2016-03-0${1 + (n % 9)},60,L,25,C,bare,hydrogen-peroxide,3,40,1,0,,mild,cleared,7`,
      ),
    ].join("\n");
    const both = await Promise.all(
      [0, 1].map(() =>
        call(importRoute.POST, "/api/import/reports", {
          cookie: admin,
          body: file,
          headers: { "content-type": "text/csv" },
        }),
      ),
    );
    expect(both.map((b) => b.status)).toEqual([200, 200]);
    const db = await getDb();
    const [n] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.source, "import"));
    expect(n!.n).toBe(40);
    expect(both[0]!.body.imported + both[1]!.body.imported).toBe(40);
  });
});
