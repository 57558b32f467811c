import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import Papa from "papaparse";
import { asc, count, eq } from "drizzle-orm";
import * as exportRoute from "@/app/api/export/reports.csv/route";
import * as importRoute from "@/app/api/import/reports/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as historyRoute from "@/app/api/reports/[id]/history/route";
import { closeDb, getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { resetAuthForTests } from "@/features/members/server/auth";
import { call } from "../support/http";
import { reportBody, signIn, signedInUser } from "../support/factories";

const PASSWORD = "round-trip-demo-pass";
const HYPERLINK = '=HYPERLINK("http://example.org/x","open me")';
const TYPED = "'=kept exactly as typed";
const original = process.env.DATA_DIR!;
const fresh = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-fresh-club-"));
let admin = "",
  moderator = "";
let linkReportId = "",
  typedReportId = "";

type Row = Record<string, string>;
const rowsOf = (csv: string) => Papa.parse<Row>(csv, { header: true, comments: "#", skipEmptyLines: true }).data;

async function exportCsv(cookie: string): Promise<string> {
  const r = await call(exportRoute.GET, "/api/export/reports.csv", { cookie });
  expect(r.status).toBe(200);
  return r.body as string;
}

function importCsv(cookie: string, csv: string, query = "") {
  return call(importRoute.POST, `/api/import/reports${query}`, {
    cookie,
    body: csv,
    headers: { "content-type": "text/csv" },
  });
}

/** Points this process at another data directory (the sign-in library holds the database, so it starts afresh). */
async function useDataDir(dir: string) {
  await closeDb();
  resetAuthForTests();
  process.env.DATA_DIR = dir;
}

async function reportCount(status?: "accepted") {
  const db = await getDb();
  const [r] = await db
    .select({ n: count() })
    .from(schema.reports)
    .where(status ? eq(schema.reports.status, status) : undefined);
  return r!.n;
}

/** The stored summaries without their computation time: what readers see. */
async function summaries() {
  const db = await getDb();
  const rows = await db
    .select()
    .from(schema.evidenceSummaries)
    .orderBy(
      asc(schema.evidenceSummaries.agentSlug),
      asc(schema.evidenceSummaries.groupSlug),
      asc(schema.evidenceSummaries.conditionSlug),
    );
  return rows.map(({ computedAt: _c, ...r }) => r);
}

beforeAll(async () => {
  await seedDemo(await getDb(), { password: PASSWORD });
  admin = await signIn("admin@example.org", PASSWORD);
  moderator = await signIn("moderator@example.org", PASSWORD);
  const member = await signedInUser("member");
  const link = await call(reportsRoute.POST, "/api/reports", {
    cookie: member.cookie,
    body: reportBody({ submit: true, outcome: { notes: HYPERLINK } }),
  });
  const typed = await call(reportsRoute.POST, "/api/reports", {
    cookie: member.cookie,
    body: reportBody({ submit: true, outcome: { notes: TYPED } }),
  });
  expect([link.status, typed.status]).toEqual([201, 201]);
  linkReportId = link.body.id;
  typedReportId = typed.body.id;
});

afterAll(async () => {
  await useDataDir(original);
  fs.rmSync(fresh, { recursive: true, force: true });
});

describe("reports exchange between clubs", () => {
  it("exports notes that start like a formula as text a spreadsheet will not run", async () => {
    const csv = await exportCsv(moderator);
    // papaparse quotes the cell and doubles its quotes; the apostrophe makes spreadsheets show it as text.
    expect(csv).toContain(`"'=HYPERLINK(""http://example.org/x"",""open me"")"`);
    const rows = rowsOf(csv);
    expect(rows.find((r) => r.id === linkReportId)!.notes).toBe(`'${HYPERLINK}`);
    expect(rows.find((r) => r.id === typedReportId)!.notes).toBe(`'${TYPED}`);
    // Numbers stay numbers: no cell of a numeric column is prefixed.
    expect(rows.every((r) => !r.fish_count!.startsWith("'") && !r.concentration!.startsWith("'"))).toBe(true);
  });

  it("carries every report's status and review events into a fresh club, and a second import changes nothing", async () => {
    const csvA = await exportCsv(admin);
    const rowsA = rowsOf(csvA);
    const acceptedA = await reportCount("accepted");
    expect(new Set(rowsA.map((r) => r.status))).toEqual(
      new Set(["accepted", "awaiting_review", "returned", "declined", "retracted"]),
    );

    // A fresh club: its own data directory, the catalogue and the demo people, no reports.
    fs.cpSync(path.join(inject("templateDataDir"), "pgdata"), path.join(fresh, "pgdata"), { recursive: true });
    await useDataDir(fresh);
    try {
      await seedDemo(await getDb(), { password: PASSWORD, reports: false });
      const freshAdmin = await signIn("admin@example.org", PASSWORD);
      expect(await reportCount()).toBe(0);

      const preview = await importCsv(freshAdmin, csvA, "?dryRun=1");
      expect(preview.status).toBe(200);
      expect(preview.body).toMatchObject({ imported: rowsA.length, skipped: 0, rejected: [], dryRun: true });
      expect(await reportCount()).toBe(0); // the dry run wrote nothing

      const first = await importCsv(freshAdmin, csvA);
      expect(first.status).toBe(200);
      expect(first.body).toMatchObject({ imported: rowsA.length, skipped: 0, rejected: [] });
      expect(first.body.touched.length).toBeGreaterThan(0);
      expect(await reportCount("accepted")).toBe(acceptedA);
      const summariesOnce = await summaries();
      expect(summariesOnce.length).toBeGreaterThan(0);

      const second = await importCsv(freshAdmin, csvA);
      expect(second.status).toBe(200);
      expect(second.body).toMatchObject({ imported: 0, skipped: rowsA.length, rejected: [], touched: [] });
      expect(await reportCount("accepted")).toBe(acceptedA);
      expect(await summaries()).toEqual(summariesOnce);

      const rowsB = new Map(rowsOf(await exportCsv(freshAdmin)).map((r) => [r.id!, r]));
      expect(rowsB.size).toBe(rowsA.length);
      for (const a of rowsA) {
        const b = rowsB.get(a.id!)!;
        expect({
          id: b.id,
          status: b.status,
          reporter: b.reporter,
          notes: b.notes,
          concentration: b.concentration,
          decided_at: b.decided_at,
        }).toEqual({
          id: a.id,
          status: a.status,
          reporter: a.reporter,
          notes: a.notes,
          concentration: a.concentration,
          decided_at: a.decided_at,
        });
        const eventsA = JSON.parse(a.review_events!);
        const eventsB = JSON.parse(b.review_events!);
        // Club B's history is club A's, then its own import.
        expect(eventsB.slice(0, -1)).toEqual(eventsA);
        expect(eventsB.at(-1)).toMatchObject({ action: "imported", to: a.status });
      }
      expect(rowsB.get(linkReportId)!.notes).toBe(`'${HYPERLINK}`); // still neutralised in B's export

      // The history API names the imported actors by the file's pseudonyms.
      const retracted = rowsA.find((r) => r.status === "retracted")!;
      const history = await call(historyRoute.GET, `/api/reports/${retracted.id}/history`, {
        cookie: freshAdmin,
        params: { id: retracted.id! },
      });
      expect(history.status).toBe(200);
      const retract = history.body.events.find((e: { action: string }) => e.action === "retract");
      expect(retract).toMatchObject({
        from: "accepted",
        to: "retracted",
        note: "Entered twice by mistake.",
        actor: { id: null },
      });
      expect(retract.actor.name).toMatch(/^member-[0-9a-f]{10}$/);

      // The neutralising apostrophe is taken off on import: the stored notes are what the member typed.
      const db = await getDb();
      const [link] = await db
        .select({ notes: schema.reports.notes })
        .from(schema.reports)
        .where(eq(schema.reports.id, linkReportId));
      const [typed] = await db
        .select({ notes: schema.reports.notes })
        .from(schema.reports)
        .where(eq(schema.reports.id, typedReportId));
      expect([link!.notes, typed!.notes]).toEqual([HYPERLINK, TYPED]);
    } finally {
      await useDataDir(original);
    }
  });

  it("imports a file without ids once, recognising its rows by content and reporter", async () => {
    const header =
      "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after,notes";
    const lines = [
      "accepted,member-paper1,poecilia-reticulata,5,adult,white-spot,2018-05-01,60,L,25,C,bare,hydrogen-peroxide,3,40,1,0,,mild,cleared,7,from the paper log",
      "accepted,member-paper2,poecilia-reticulata,4,adult,white-spot,2018-06-01,60,L,25,C,bare,hydrogen-peroxide,3,60,1,0,,none,cleared,7,",
      "declined,member-paper2,poecilia-reticulata,4,adult,white-spot,2018-07-01,60,L,25,C,bare,hydrogen-peroxide,3,60,1,0,,none,cleared,7,",
    ];
    // The last row repeats the first with different spacing: the same report, skipped within the file.
    const csv = [header, ...lines, lines[0]!.replace("5,adult", " 5 , adult ")].join("\n");
    const acceptedBefore = await reportCount("accepted");
    const once = await importCsv(admin, csv);
    expect(once.status).toBe(200);
    expect(once.body).toMatchObject({ imported: 3, skipped: 1, rejected: [] });
    expect(await reportCount("accepted")).toBe(acceptedBefore + 2);
    const twice = await importCsv(admin, csv);
    expect(twice.body).toMatchObject({ imported: 0, skipped: 4, rejected: [] });
    expect(await reportCount("accepted")).toBe(acceptedBefore + 2);
    // Statuses other than awaiting review are kept: the declined row does not wait for review again.
    const db = await getDb();
    const [declined] = await db
      .select({ n: count() })
      .from(schema.reports)
      .where(eq(schema.reports.externalReporter, "member-paper2"));
    expect(declined!.n).toBe(2);
  });
});
