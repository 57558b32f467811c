import { beforeAll, describe, expect, it } from "vitest";
import Papa from "papaparse";
import { count, eq } from "drizzle-orm";
import * as exportRoute from "@/app/api/export/reports.csv/route";
import * as importRoute from "@/app/api/import/reports/route";
import * as summaryRoute from "@/app/api/summaries/[groupSlug]/route";
import { getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { call } from "../support/http";
import { signIn } from "../support/factories";

let admin = "",
  moderator = "",
  member = "";

beforeAll(async () => {
  await seedDemo(await getDb(), { password: "exchange-demo-pass" });
  admin = await signIn("admin@example.org", "exchange-demo-pass");
  moderator = await signIn("moderator@example.org", "exchange-demo-pass");
  member = await signIn("member@example.org", "exchange-demo-pass");
});

describe("reports CSV", () => {
  it("exports submitted reports for moderators, reporters pseudonymised, with the anecdotal notice", async () => {
    expect((await call(exportRoute.GET, "/api/export/reports.csv", { cookie: member })).status).toBe(403);
    expect((await call(exportRoute.GET, "/api/export/reports.csv")).status).toBe(401);
    const r = await call(exportRoute.GET, "/api/export/reports.csv", { cookie: moderator });
    expect(r.status).toBe(200);
    const text = r.body as string;
    expect(text.split("\n")[0]).toMatch(/^# Anecdotal evidence/);
    expect(text).not.toMatch(/@example\.org|Priya|Orla/);
    const rows = Papa.parse<Record<string, string>>(text, { header: true, comments: "#", skipEmptyLines: true }).data;
    expect(rows).toHaveLength(140); // 150 demo reports less the 10 drafts
    const byReporter = new Set(rows.map((x) => x.reporter));
    expect([...byReporter].every((p) => /^member-[0-9a-f]{10}$/.test(p!))).toBe(true);
    expect(byReporter.size).toBeGreaterThan(5);
  });

  it("imports good rows, lists bad ones with what to fix, and recomputes the summaries", async () => {
    const db = await getDb();
    const before = await call(summaryRoute.GET, "/api/summaries/livebearers?agent=hydrogen-peroxide", {
      params: { groupSlug: "livebearers" },
    });
    const header =
      "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after";
    const csv = [
      "# historical records from the club's paper log",
      header,
      "accepted,member-old1,poecilia-reticulata,5,adult,white-spot,2019-05-01,60,L,25,C,bare,hydrogen-peroxide,3,40,1,0,,mild,cleared,7",
      "accepted,member-old2,poecilia-reticulata,4,adult,white-spot,2019-06-01,60,L,25,C,bare,hydrogen-peroxide,3,60,1,0,,none,cleared,7",
      "accepted,member-old2,poecilia-reticulata,9,adult,white-spot,2019-07-01,60,L,25,C,bare,hydrogen-peroxide,3,40,1,12,treatment,severe,worse,7",
      "accepted,member-old3,no-such-fish,5,adult,white-spot,2031-01-01,-4,L,25,C,bare,hydrogen-peroxide,3,40,1,0,,mild,cleared,7",
      ",member-old3,poecilia-reticulata,5,adult,white-spot,2019-08-01,60,L,25,C,bare,hydrogen-peroxide,3,40,1,0,,mild,cleared,7",
    ].join("\n");
    const bad = await call(importRoute.POST, "/api/import/reports", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "application/json" },
    });
    expect(bad.status).toBe(415);
    expect(
      (
        await call(importRoute.POST, "/api/import/reports", {
          cookie: moderator,
          body: csv,
          headers: { "content-type": "text/csv" },
        })
      ).status,
    ).toBe(403);

    // Without ?partial=1 a file with rejected rows imports nothing, and says which rows to fix.
    const refused = await call(importRoute.POST, "/api/import/reports", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "text/csv" },
    });
    expect(refused.status).toBe(422);
    expect(refused.body.imported).toBe(0);
    expect(refused.body.rejected.map((x: { row: number }) => x.row)).toEqual([4, 5]);
    expect(refused.body.error.issues[0].path).toBe("row 4: outcome.fishLost");
    const [none] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.source, "import"));
    expect(none!.n).toBe(0);

    const r = await call(importRoute.POST, "/api/import/reports?partial=1", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "text/csv" },
    });
    expect(r.status).toBe(200);
    expect(r.body.imported).toBe(3);
    expect(r.body.skipped).toBe(0);
    expect(r.body.rejected.map((x: { row: number }) => x.row)).toEqual([4, 5]);
    expect(r.body.rejected[0].issues.map((i: { path: string }) => i.path)).toEqual(["outcome.fishLost"]);
    expect(r.body.rejected[1].issues.map((i: { path: string }) => i.path).sort()).toEqual([
      "species_id",
      "startedOn",
      "water.volume",
    ]);

    const [imported] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.source, "import"));
    expect(imported!.n).toBe(3);
    const after = await call(summaryRoute.GET, "/api/summaries/livebearers?agent=hydrogen-peroxide", {
      params: { groupSlug: "livebearers" },
    });
    expect(after.body.reports).toBe(before.body.reports + 2); // the third good row waits for review
    expect(after.body.members).toBe(before.body.members + 2); // two pseudonymous reporters
    // 40 mL × 30 mg/mL / 60 L = 20 mg/L and 60 mL → 30 mg/L, both tolerated.
    expect(
      after.body.points.filter((p: { dose: number }) => p.dose === 20 || p.dose === 30).length,
    ).toBeGreaterThanOrEqual(2);
  });

  it("refuses a file that is not CSV with the needed columns, and changes nothing", async () => {
    const db = await getDb();
    const [before] = await db.select({ n: count() }).from(schema.reports);
    const r = await call(importRoute.POST, "/api/import/reports", {
      cookie: admin,
      body: "name,colour\nnemo,orange\n",
      headers: { "content-type": "text/csv" },
    });
    expect(r.status).toBe(422);
    expect(r.body.error.issues.map((i: { path: string }) => i.path)).toEqual([
      "fish_count",
      "agent_slug",
      "started_on",
    ]);
    const [after] = await db.select({ n: count() }).from(schema.reports);
    expect(after!.n).toBe(before!.n);
  });
});
