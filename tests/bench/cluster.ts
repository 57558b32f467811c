// `npm run bench -- --cluster` (or run this file alone) — not part of the test run. On a throwaway PostgreSQL server
// holding 100,000 accepted reports over 15 groups, measures:
//   1. GET /api/summaries throughput of two app processes (sharing the server and the S3 fake, loaded at once)
//      against one process alone;
//   2. the time to recompute one group after an accept on the server against the same on the embedded PGlite.
// Ends with one JSON line: {"clusterThroughputRatio", "oneProcessRps", "twoProcessRps", "recomputePostgresMs",
// "recomputePgliteMs", "recomputeServerVsEmbedded"}. Needs a production build (made if missing) and initdb/pg_ctl.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { sql } from "drizzle-orm";

const REPORTS = Number(process.env.BENCH_REPORTS ?? 100_000);
const DURATION = Number(process.env.BENCH_SECONDS ?? 10);
process.env.NEXT_TELEMETRY_DISABLED = "1";
process.env.BETTER_AUTH_SECRET ??= "bench-secret-bench-secret-bench-secret-00";

const { startTempPostgres, startApp, waitHealthy, ensureBuild, freePort } = await import("@/db/cluster");
const { startLocalS3 } = await import("@/db/s3-local");
const { getDb, closeDb } = await import("@/db/client");
const { seedCatalogue } = await import("@/features/catalogue/server");
const { recomputeAll, recomputeGroupAgent } = await import("@/features/evidence/server");

const rowsOf = (r: unknown) => (r as { rows: Record<string, unknown>[] }).rows;
const ms = (t: bigint) => Number(process.hrtime.bigint() - t) / 1e6;

/** The same deterministic 100,000 reports as tests/bench/summaries.ts, on whichever database getDb() opens. */
async function seed(): Promise<void> {
  const db = await getDb();
  await seedCatalogue(db);
  await db.execute(sql`insert into users (id, name, email, email_verified, role)
    select 'bench-' || i, 'Bench member ' || i, 'bench' || i || '@example.org', true, 'member' from generate_series(1, 300) i`);
  await db.execute(sql`
    with g as (select slug, row_number() over (order by slug) as k from species_groups),
         s as (select id, group_slug, row_number() over (partition by group_slug order by id) as k, count(*) over (partition by group_slug) as n from species)
    insert into reports (id, author_id, status, source, species_id, group_slug, fish_count, size_class, condition_slug, started_on,
                         water_volume, water_volume_unit, volume_l, temperature, temperature_unit, temperature_c, setting,
                         agent_slug, stock_percent, stock_basis, amount_ml, doses, fish_lost, loss_cause, distress, condition_outcome,
                         observed_days_after, show_name, concentration, submitted_at, decided_at)
    select 'b' || i, 'bench-' || (1 + i % 300), 'accepted', 'demo', s.id, g.slug, 1 + i % 9, 'adult',
           (array['white-spot','gill-flukes','skin-flukes','ichthyobodo','none-preventive'])[1 + i % 5], date '2025-01-01' + (i % 600),
           100, 'L', 100, 25, 'C', 25, 'bare', 'hydrogen-peroxide', 3, 'w/v', (5 + (i * 7919) % 300) / 10.0 * 100 / 30, 1,
           case when (i * 31) % 17 = 0 then 1 else 0 end, case when (i * 31) % 17 = 0 then 'treatment' end,
           case when (i * 13) % 23 = 0 then 'severe' else 'mild' end, case when i % 3 = 0 then 'cleared' else 'improved' end,
           7, false, (5 + (i * 7919) % 300) / 10.0, now(), now()
      from generate_series(1, ${REPORTS}) i
      join g on g.k = 1 + i % 15
      join s on s.group_slug = g.slug and s.k = 1 + (i / 15) % s.n`);
  await recomputeAll(db);
}

/** Median time of recomputing the largest group after an accept (three warm-ups, then 11 runs). */
async function recomputeMs(): Promise<number> {
  const db = await getDb();
  const [row] = rowsOf(
    await db.execute(
      sql`select group_slug from reports where status = 'accepted' group by group_slug order by count(*) desc limit 1`,
    ),
  );
  const group = String(row!.group_slug);
  const xs: number[] = [];
  for (let i = 0; i < 14; i++) {
    await db.execute(
      sql`update reports set status = case when status = 'accepted' then 'awaiting_review' else 'accepted' end where id = 'b15'`,
    );
    const t = process.hrtime.bigint();
    await recomputeGroupAgent(db, group, "hydrogen-peroxide");
    if (i >= 3) xs.push(ms(t));
  }
  xs.sort((a, b) => a - b);
  return xs[Math.floor(xs.length / 2)]!;
}

async function load(urls: string[]): Promise<{ rps: number; errors: number; p99: number }> {
  const runs = await Promise.all(
    urls.map((url) => autocannon({ url, connections: 10, duration: DURATION, pipelining: 1 })),
  );
  return {
    rps: runs.reduce((s, r) => s + r.requests.average, 0),
    errors: runs.reduce((s, r) => s + r.errors + r.non2xx, 0),
    p99: Math.max(...runs.map((r) => r.latency.p99)),
  };
}

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-bench-cluster-"));
const pg = await startTempPostgres();
const cleanup: (() => Promise<void> | void)[] = [
  () => pg.stop(),
  () => fs.rmSync(tmp, { recursive: true, force: true }),
];
try {
  // The embedded database first: same data, same recompute.
  process.env.DATA_DIR = path.join(tmp, "pglite");
  delete process.env.DATABASE_URL;
  let t = process.hrtime.bigint();
  await seed();
  console.log(`PGlite: seeded and recomputed ${REPORTS} reports in ${ms(t).toFixed(0)} ms`);
  const recomputePgliteMs = await recomputeMs();
  await closeDb();

  process.env.DATA_DIR = path.join(tmp, "bench");
  process.env.DATABASE_URL = pg.url;
  t = process.hrtime.bigint();
  await seed();
  console.log(`PostgreSQL: seeded and recomputed ${REPORTS} reports in ${ms(t).toFixed(0)} ms`);
  const recomputePostgresMs = await recomputeMs();
  await closeDb();
  console.log(
    `recompute of the largest group: PostgreSQL ${recomputePostgresMs.toFixed(1)} ms, PGlite ${recomputePgliteMs.toFixed(1)} ms`,
  );

  await ensureBuild();
  const s3 = await startLocalS3({ port: await freePort(), dir: path.join(tmp, "s3") });
  cleanup.unshift(() => s3.close());
  const env = { ...s3.env, DATABASE_URL: pg.url, BETTER_AUTH_SECRET: process.env.BETTER_AUTH_SECRET! };
  const apps = [];
  for (const name of ["A", "B"]) {
    const app = await startApp(name, env, { dataDir: path.join(tmp, `data-${name}`) });
    cleanup.unshift(() => app.stop());
    await waitHealthy(app);
    apps.push(app);
  }
  const path_ = "/api/summaries?agent=hydrogen-peroxide";
  for (const a of apps) await fetch(`${a.url}${path_}`);
  const one = await load([`${apps[0]!.url}${path_}`]);
  const two = await load(apps.map((a) => `${a.url}${path_}`));
  const ratio = two.rps / one.rps;
  console.log(
    `/api/summaries: one process ${one.rps.toFixed(0)} req/s (p99 ${one.p99} ms, errors ${one.errors}); two processes ${two.rps.toFixed(0)} req/s (p99 ${two.p99} ms, errors ${two.errors}); ratio ${ratio.toFixed(2)} on ${os.cpus().length} cores`,
  );
  console.log(
    JSON.stringify({
      clusterThroughputRatio: Number(ratio.toFixed(3)),
      oneProcessRps: Math.round(one.rps),
      twoProcessRps: Math.round(two.rps),
      recomputePostgresMs: Number(recomputePostgresMs.toFixed(1)),
      recomputePgliteMs: Number(recomputePgliteMs.toFixed(1)),
      recomputeServerVsEmbedded: Number((recomputePostgresMs / recomputePgliteMs).toFixed(3)),
      cores: os.cpus().length,
    }),
  );
} finally {
  for (const c of cleanup) await c();
}
process.exit(0);
