// npm run bench:exchange — not part of the test run. In one process, against a temporary data directory:
//   1. imports a 10,000-row reports CSV (the admin's import, batched) while a reader calls GET /api/summaries every
//      50 ms, and reports the import time and the longest read latency during it;
//   2. seeds 100,000 submitted reports, streams GET /api/export/reports.csv to the end, and reports its time and the
//      peak RSS of this process above what it used before the export.
// It ends with one JSON line: {"importMs", "importRows", "longestReadMs", "exportMs", "exportRows", "exportPeakRssDeltaMb"}.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";

const IMPORT_ROWS = Number(process.env.BENCH_IMPORT_ROWS ?? 10_000);
const EXPORT_ROWS = Number(process.env.BENCH_EXPORT_ROWS ?? 100_000);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-bench-exchange-"));
process.env.DATA_DIR = dir;
process.env.BETTER_AUTH_SECRET ??= "bench-secret-bench-secret-bench-secret-00";

const { getDb, closeDb, schema } = await import("@/db/client");
const { seedCatalogue } = await import("@/features/catalogue/server");
const { importReportsCsv, exportReportsCsv } = await import("@/features/exchange/server");
const summariesRoute = await import("@/app/api/summaries/route");

const db = await getDb();
await seedCatalogue(db);
await db.insert(schema.users).values({
  id: "bench-admin",
  name: "Bench admin",
  email: "bench-admin@example.org",
  emailVerified: true,
  role: "admin",
});
const admin = { id: "bench-admin", role: "admin" as const, name: "Bench admin", email: "bench-admin@example.org" };

// 1. Import while reading.
const header =
  "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after,notes";
const species = ["poecilia-reticulata", "paracheirodon-innesi"];
const csv = [
  header,
  ...Array.from(
    { length: IMPORT_ROWS },
    (_, n) =>
      `accepted,member-bench${n % 60},${species[n % 2]},${3 + (n % 9)},adult,white-spot,2017-0${1 + (n % 9)}-1${n % 10},60,L,25,C,bare,hydrogen-peroxide,3,${20 + (n % 50)},1,0,,mild,cleared,7,bench row ${n}`,
  ),
].join("\n");
let reading = true;
let longestReadMs = 0;
const reader = (async () => {
  while (reading) {
    const t = performance.now();
    const res = await summariesRoute.GET(new Request("http://localhost:3000/api/summaries?agent=hydrogen-peroxide"), {
      params: Promise.resolve({}),
    });
    await res.text();
    longestReadMs = Math.max(longestReadMs, performance.now() - t);
    await new Promise((r) => setTimeout(r, 50));
  }
})();
const t0 = performance.now();
const result = await importReportsCsv(admin as never, csv);
const importMs = performance.now() - t0;
reading = false;
await reader;
console.log(
  `imported ${result.imported} rows in ${(importMs / 1000).toFixed(1)} s; longest read meanwhile ${longestReadMs.toFixed(0)} ms`,
);

// 2. Export 100,000 reports as a stream.
const existing = result.imported;
await db.execute(sql`
  insert into reports (id, author_id, status, source, species_id, group_slug, fish_count, size_class, condition_slug, started_on,
                       water_volume, water_volume_unit, volume_l, temperature, temperature_unit, temperature_c, setting,
                       agent_slug, stock_percent, stock_basis, amount_ml, doses, fish_lost, distress, condition_outcome,
                       observed_days_after, notes, concentration, submitted_at, decided_at)
  select 'x' || i, 'bench-admin', 'accepted', 'demo', 'poecilia-reticulata', 'livebearers', 1 + i % 9, 'adult', 'white-spot', date '2025-01-01' + (i % 600),
         100, 'L', 100, 25, 'C', 25, 'bare', 'hydrogen-peroxide', 3, 'w/v', 10 + i % 40, 1, 0, 'mild', 'cleared', 7,
         'Bench report ' || i, 3 + i % 12, now(), now()
    from generate_series(1, ${Math.max(0, EXPORT_ROWS - existing)}) i`);
global.gc?.();
const rss = () => process.memoryUsage().rss / 1024 / 1024;
const baseline = rss();
let peak = baseline;
const sampler = setInterval(() => (peak = Math.max(peak, rss())), 20);
const t1 = performance.now();
const stream = exportReportsCsv(admin as never);
let bytes = 0;
let lines = 0;
const r = stream.getReader();
for (;;) {
  const { done, value } = await r.read();
  if (done) break;
  bytes += value.byteLength;
  for (const b of value) if (b === 10) lines += 1;
}
const exportMs = performance.now() - t1;
clearInterval(sampler);
peak = Math.max(peak, rss());
const exportRows = lines - 2; // the notice and the header (no report here has a line break in its cells)
console.log(
  `exported ${exportRows} reports (${(bytes / 1024 / 1024).toFixed(1)} MB) in ${(exportMs / 1000).toFixed(1)} s; RSS ${baseline.toFixed(0)} → peak ${peak.toFixed(0)} MB`,
);

await closeDb();
fs.rmSync(dir, { recursive: true, force: true });
console.log(
  JSON.stringify({
    importMs: Math.round(importMs),
    importRows: result.imported,
    longestReadMs: Math.round(longestReadMs),
    exportMs: Math.round(exportMs),
    exportRows,
    exportPeakRssDeltaMb: Math.round(peak - baseline),
  }),
);
