import { beforeAll, describe, expect, it } from "vitest";
import { count, eq, ne } from "drizzle-orm";
import Papa from "papaparse";
import * as exportRoute from "@/app/api/export/reports.csv/route";
import * as importRoute from "@/app/api/import/reports/route";
import * as summaryRoute from "@/app/api/summaries/route";
import { getDb, schema } from "@/db/client";
import { seedDemo } from "@/db/seed";
import { IMPORT_BATCH } from "@/features/exchange/server";
import { BASE, call } from "../support/http";
import { signIn } from "../support/factories";

const PASSWORD = "exchange-scale-pass";
let admin = "";

const header =
  "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after,notes";
/** One valid row; `n` makes each row's content (and so its fingerprint) different. */
const line = (n: number, notes = `paper log entry ${n}`) =>
  `accepted,member-bulk${n % 40},poecilia-reticulata,${3 + (n % 9)},adult,white-spot,2017-0${1 + (n % 9)}-1${n % 10},60,L,25,C,bare,hydrogen-peroxide,3,${20 + (n % 50)},1,0,,mild,cleared,7,"${notes}"`;

async function importedCount() {
  const db = await getDb();
  const [r] = await db.select({ n: count() }).from(schema.reports).where(eq(schema.reports.source, "import"));
  return r!.n;
}

beforeAll(async () => {
  await seedDemo(await getDb(), { password: PASSWORD });
  admin = await signIn("admin@example.org", PASSWORD);
});

describe("importing at scale and refusing bad cells", () => {
  it("rejects a row with a NUL cell naming its row and column, without failing the rest", async () => {
    const csv = [header, line(1), line(2, "bad\u0000cell"), line(3), line(4, "bell\u0007here")].join("\n");
    const refused = await call(importRoute.POST, "/api/import/reports", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "text/csv" },
    });
    expect(refused.status).toBe(422);
    expect(refused.body.rejected).toEqual([
      { row: 3, issues: [{ path: "notes", message: "Contains a control character (U+0000); remove it." }] },
      { row: 5, issues: [{ path: "notes", message: "Contains a control character (U+0007); remove it." }] },
    ]);
    expect(await importedCount()).toBe(0);

    const partial = await call(importRoute.POST, "/api/import/reports?partial=1", {
      cookie: admin,
      body: csv,
      headers: { "content-type": "text/csv" },
    });
    expect(partial.status).toBe(200);
    expect(partial.body).toMatchObject({ imported: 2, skipped: 0 });
    expect(partial.body.rejected.map((r: { row: number }) => r.row)).toEqual([3, 5]);
    expect(await importedCount()).toBe(2);
  });

  it("refuses a bad query flag with 422 and imports nothing", async () => {
    const r = await call(importRoute.POST, "/api/import/reports?dryRun=maybe", {
      cookie: admin,
      body: [header, line(9)].join("\n"),
      headers: { "content-type": "text/csv" },
    });
    expect(r.status).toBe(422);
    expect(r.body.error.issues[0].path).toBe("dryRun");
  });

  it("imports a few thousand rows in batches, reporting progress and serving reads meanwhile", async () => {
    const rows = 3000;
    const csv = [header, ...Array.from({ length: rows }, (_, k) => line(1000 + k))].join("\n");
    const before = await importedCount();
    const req = new Request(`${BASE}/api/import/reports`, {
      method: "POST",
      body: csv,
      headers: { cookie: admin, origin: BASE, "content-type": "text/csv", accept: "application/x-ndjson" },
    });
    const res = await importRoute.POST(req, { params: Promise.resolve({}) });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^application\/x-ndjson/);

    const reader = res.body!.pipeThrough(new TextDecoderStream()).getReader();
    // Each line of the stream, as the client would parse it: progress, then the result.
    const messages: { progress?: { phase: string; done: number; total: number }; result?: unknown }[] = [];
    let buffer = "";
    let readDuringWrite: Promise<{ status: number; ms: number; settledBeforeEnd: boolean }> | null = null;
    let ended = false;
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      buffer += value;
      const parts = buffer.split("\n");
      buffer = parts.pop()!;
      for (const p of parts.filter(Boolean)) {
        const m = JSON.parse(p);
        messages.push(m);
        // Once the first batch is written, ask for something else: it must be answered while the import goes on.
        if (!readDuringWrite && m.progress?.phase === "writing" && m.progress.done < m.progress.total) {
          const t0 = performance.now();
          readDuringWrite = call(summaryRoute.GET, "/api/summaries?agent=hydrogen-peroxide").then((r) => ({
            status: r.status,
            ms: performance.now() - t0,
            settledBeforeEnd: !ended,
          }));
        }
      }
    }
    ended = true;
    const writing = messages.filter((m) => m.progress?.phase === "writing");
    expect(writing).toHaveLength(Math.ceil(rows / IMPORT_BATCH));
    expect(writing.at(-1)?.progress).toEqual({ phase: "writing", done: rows, total: rows });
    expect(messages.some((m) => m.progress?.phase === "checking")).toBe(true);
    expect(messages.at(-1)?.result).toMatchObject({ imported: rows, skipped: 0, rejected: [] });
    expect(await importedCount()).toBe(before + rows);

    const read = await readDuringWrite!;
    expect(read.status).toBe(200);
    expect(read.settledBeforeEnd).toBe(true);
  }, 300_000);

  it("streams the reports export in chunks of 500, every submitted report exactly once", async () => {
    const res = await exportRoute.GET(new Request(`${BASE}/api/export/reports.csv`, { headers: { cookie: admin } }), {
      params: Promise.resolve({}),
    });
    expect(res.status).toBe(200);
    const reader = res.body!.getReader();
    const decoder = new TextDecoder();
    let chunks = 0;
    let text = "";
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      chunks += 1;
      text += decoder.decode(value, { stream: true });
    }
    const db = await getDb();
    const [submitted] = await db.select({ n: count() }).from(schema.reports).where(ne(schema.reports.status, "draft"));
    const rows = Papa.parse<Record<string, string>>(text, { header: true, comments: "#", skipEmptyLines: true }).data;
    expect(rows).toHaveLength(submitted!.n);
    expect(new Set(rows.map((r) => r.id)).size).toBe(submitted!.n);
    // The notice and header, then one chunk per 500 reports: never the whole file at once.
    expect(chunks).toBe(1 + Math.ceil(submitted!.n / 500));
  }, 120_000);
});
