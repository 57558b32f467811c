// npm run bench — not part of the test run. Seeds 100,000 accepted reports over 15 groups in a temporary
// data directory, starts the built app, and measures from one run:
//   1. throughput of GET /api/summaries against the trivial GET /api/health/live on the same server;
//   2. the time to recompute one group after an accept against the bare SQL aggregate for that group;
//   3. peak memory (RSS) of the server and of this process.
// It ends with one JSON line: {"summariesThroughputRatio", "recomputeRatio", "peakRssMb"}.
// BENCH_RECOMPUTE_ONLY=1 stops after step 2 (no build, no server).
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { sql } from "drizzle-orm";
import { freePort } from "../support/free-port";

const REPORTS = Number(process.env.BENCH_REPORTS ?? 100_000);
const DURATION = Number(process.env.BENCH_SECONDS ?? 10);
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-bench-"));
process.env.DATA_DIR = dir;
process.env.BETTER_AUTH_SECRET ??= "bench-secret-bench-secret-bench-secret-00";

const { getDb, closeDb } = await import("@/db/client");
const { seedCatalogue } = await import("@/features/catalogue/server");
const { recomputeAll, recomputeGroupAgent, summarySql, toleratedCountsSql, doseResponses, doseTrialsSql } = await import("@/features/evidence/server");
const { medianRank, fitDoseResponse } = await import("@/features/evidence");

const rowsOf = (r: unknown) => (r as { rows: Record<string, unknown>[] }).rows;
const ms = (t: bigint) => Number(process.hrtime.bigint() - t) / 1e6;

async function seed() {
  const db = await getDb();
  await seedCatalogue(db);
  await db.execute(sql`insert into users (id, name, email, email_verified, role)
    select 'bench-' || i, 'Bench member ' || i, 'bench' || i || '@example.org', true, 'member' from generate_series(1, 300) i`);
  // Deterministic pseudo-random values from the row number (no random()), spread over 15 groups.
  const t = process.hrtime.bigint();
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
  console.log(`seeded ${REPORTS} accepted reports in ${ms(t).toFixed(0)} ms`);
  const t2 = process.hrtime.bigint();
  await recomputeAll(db);
  console.log(`recomputed every summary in ${ms(t2).toFixed(0)} ms`);
}

async function measureRecompute() {
  const db = await getDb();
  const [row] = rowsOf(await db.execute(sql`select group_slug from reports where status = 'accepted' group by group_slug order by count(*) desc limit 1`));
  const group = String(row!.group_slug);
  const [{ band_edges: edges }] = rowsOf(await db.execute(sql`select band_edges from agents where slug = 'hydrogen-peroxide'`)) as [{ band_edges: number[] }];
  const time = async (fn: () => Promise<unknown>, n = 15) => {
    for (let i = 0; i < 3; i++) await fn();
    const xs: number[] = [];
    for (let i = 0; i < n; i++) {
      const t = process.hrtime.bigint();
      await fn();
      xs.push(ms(t));
    }
    xs.sort((a, b) => a - b);
    return xs[Math.floor(xs.length / 2)]!;
  };
  // An accept changes one report; the recompute that follows is what we time.
  await db.execute(sql`update reports set status = 'awaiting_review' where id = 'b15'`);
  await db.execute(sql`update reports set status = 'accepted' where id = 'b15'`);
  // The bare SQL aggregate: the one statement that computes every published figure of the group (all
  // conditions and each), run alone — no settings read, no count of tolerated reports, nothing assembled or stored.
  const ranks = new Map<string, { r: number; n: number }>();
  for (const k of rowsOf(await db.execute(toleratedCountsSql(group, "hydrogen-peroxide")))) {
    const rank = medianRank(Number(k.n), 95);
    if (rank) ranks.set(k.whole ? "*all*" : String(k.c ?? ""), { r: rank.r, n: Number(k.n) });
  }
  const bare = await time(() => db.execute(summarySql(group, "hydrogen-peroxide", edges, ranks)));
  const recompute = await time(() => recomputeGroupAgent(db, group, "hydrogen-peroxide"));
  // The dose–response part of the recompute on its own: its SQL aggregate plus the fits of every condition set.
  const tolerated = sql.raw("(not (coalesce(r.fish_lost, 0) > 0 and coalesce(r.loss_cause, 'unknown') in ('treatment', 'unknown')) and coalesce(r.distress, 'none') <> 'severe')");
  const acceptedHere = sql`r.status = 'accepted' and r.group_slug = ${group} and r.agent_slug = 'hydrogen-peroxide' and r.concentration is not null`;
  const doseResponse = await time(() => doseResponses(db, acceptedHere, tolerated, 95));
  const doseTrials = await time(() => db.execute(doseTrialsSql(acceptedHere, tolerated)));
  // The bench's outcomes do not depend on dose, so its fits stop at "risk does not rise"; time a full fit (a rising
  // curve over 300 distinct doses, 6,600 reports: estimates, profile limits, curve) as well.
  const rising = Array.from({ length: 300 }, (_, k) => {
    const dose = (5 + k) / 10, n = 22;
    return { dose, n, adverse: Math.max(0, Math.min(n, Math.round(n / (1 + Math.exp(3 - 1.5 * Math.log10(dose))) + ((k % 3) - 1)))) };
  });
  const fullFit = await time(async () => fitDoseResponse(rising, 95), 30);
  const [{ n }] = rowsOf(await db.execute(sql`select count(*)::int as n from reports where group_slug = ${group} and status = 'accepted'`)) as [{ n: number }];
  return { group, reportsInGroup: n, bareMs: bare, recomputeMs: recompute, doseResponseMs: doseResponse, doseTrialsMs: doseTrials, fullFitMs: fullFit, ratio: recompute / bare };
}


function rssOf(pid: number): number {
  try {
    const status = fs.readFileSync(`/proc/${pid}/status`, "utf8");
    return Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0) / 1024; // peak resident set, MB
  } catch {
    return 0;
  }
}

async function load(url: string) {
  const r = await autocannon({ url, connections: 10, duration: DURATION, pipelining: 1 });
  return { rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.non2xx };
}

await seed();
const recompute = await measureRecompute();
console.log(`recompute of ${recompute.group} (${recompute.reportsInGroup} reports): ${recompute.recomputeMs.toFixed(1)} ms (of which the dose–response aggregate and fits ${recompute.doseResponseMs.toFixed(1)} ms, its SQL alone ${recompute.doseTrialsMs.toFixed(1)} ms; one full fit of a rising curve ${recompute.fullFitMs.toFixed(2)} ms); bare SQL aggregate ${recompute.bareMs.toFixed(1)} ms; ratio ${recompute.ratio.toFixed(2)}`);
await closeDb();
if (process.env.BENCH_RECOMPUTE_ONLY === "1") {
  // Just the recompute ratio: no build, no server.
  fs.rmSync(dir, { recursive: true, force: true });
  console.log(JSON.stringify({ recomputeRatio: Number(recompute.ratio.toFixed(3)) }));
  process.exit(0);
}

const { buildIfNeeded } = await import("@/db/serve");
buildIfNeeded();
const port = await freePort();
const server = spawn(process.execPath, ["node_modules/next/dist/bin/next", "start", "-p", String(port)], {
  env: { ...process.env, NODE_ENV: "production", DATA_DIR: dir, PORT: String(port) },
  stdio: ["ignore", "ignore", "inherit"],
});
const base = `http://127.0.0.1:${port}`;
for (let i = 0; i < 120; i++) {
  await new Promise((r) => setTimeout(r, 500));
  if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) break;
}
await fetch(`${base}/api/summaries?agent=hydrogen-peroxide`);
const trivial = await load(`${base}/api/health/live`);
const summaries = await load(`${base}/api/summaries?agent=hydrogen-peroxide`);
const serverRss = rssOf(server.pid!);
server.kill("SIGTERM");
const ratio = summaries.rps / trivial.rps;
console.log(`trivial route: ${trivial.rps.toFixed(0)} req/s (p50 ${trivial.p50} ms, p99 ${trivial.p99} ms, errors ${trivial.errors})`);
console.log(`/api/summaries: ${summaries.rps.toFixed(0)} req/s (p50 ${summaries.p50} ms, p99 ${summaries.p99} ms, errors ${summaries.errors}); ratio ${ratio.toFixed(2)}`);
const peakRssMb = Math.round(Math.max(serverRss, rssOf(process.pid)));
console.log(`peak RSS: server ${serverRss.toFixed(0)} MB, bench process ${rssOf(process.pid).toFixed(0)} MB`);
fs.rmSync(dir, { recursive: true, force: true });
console.log(JSON.stringify({ summariesThroughputRatio: Number(ratio.toFixed(3)), recomputeRatio: Number(recompute.ratio.toFixed(3)), peakRssMb }));
process.exit(0);
