// npm run bench [-- --reports 10000,100000,1000000] — not part of the test run. For each N, in a fresh temporary data
// directory: seeds N accepted reports in SQL, times the recompute against its bare SQL aggregate, then starts the app
// the way `npm start` does (db/start.ts, a process tree) and measures it over HTTP:
//   start-up; bytes per response; serial latency and throughput (autocannon) of the summaries list, a group's API and
//   page, and the evidence index against the trivial /api/health/live, after a warm-up, in three rounds whose route
//   order rotates (min and median), with the server tree's CPU time per request from /proc beside every ratio;
//   submit, accept and return latency; a 10,000-row import with the longest liveness wait during it; the full
//   reports export with the server's peak memory; the data directory against the live data.
// Prints a per-N table, then one JSON line. Options: --reports LIST (default 10000,100000), --seconds S per
// throughput run (5), --rounds R (3), --connections C (10), --import-rows R (10000), --recompute-only (no server),
// --cluster (runs tests/bench/cluster.ts with the other options instead).
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import http from "node:http";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { sql } from "drizzle-orm";
import { freePort } from "../support/free-port";
import { dirBytes, machine, roleOf, rssMbOf, rssSampler, rssSamplerByRole, treeCpuMs, treeOf, treePeaks } from "./proc";
import { BENCH_PASSWORD, benchPeople, seedBench } from "./seed";

// ---------------------------------------------------------------- options
const argv = process.argv.slice(2);
const opt = (name: string) => {
  const i = argv.findIndex((a) => a === `--${name}` || a.startsWith(`--${name}=`));
  if (i < 0) return undefined;
  return argv[i]!.includes("=") ? argv[i]!.split("=")[1] : argv[i + 1];
};
const flag = (name: string) => argv.includes(`--${name}`);
const num = (s: string) => {
  const m = /^(\d+(?:\.\d+)?)([km]?)$/i.exec(s.trim().replace(/[_,]/g, ""));
  if (!m) throw new Error(`Not a count: ${s} (write 100000, 100k or 1m)`);
  return Math.round(Number(m[1]) * ({ k: 1e3, m: 1e6 }[m[2]!.toLowerCase() as "k" | "m"] ?? 1));
};

if (flag("cluster")) {
  const file = path.join(process.cwd(), "tests", "bench", "cluster.ts");
  if (!fs.existsSync(file)) {
    console.error(
      "--cluster: tests/bench/cluster.ts is not in this tree yet (the cluster bench comes with the scale-out work); nothing run.",
    );
    process.exit(2);
  }
  const rest = argv.filter((a) => a !== "--cluster");
  const child = spawn(
    process.execPath,
    [path.join("node_modules", "tsx", "dist", "cli.mjs"), "--conditions=react-server", file, ...rest],
    { stdio: "inherit" },
  );
  child.on("exit", (code) => process.exit(code ?? 1));
  await new Promise(() => {});
}

const REPORTS = opt("reuse")
  ? [0]
  : (opt("reports") ?? process.env.BENCH_REPORTS ?? "10000,100000")
      .split(/[,\s]+/)
      .filter(Boolean)
      .map(num);
const SECONDS = Number(opt("seconds") ?? 5);
const ROUNDS = Number(opt("rounds") ?? 3);
const CONNECTIONS = Number(opt("connections") ?? 10);
const IMPORT_ROWS = num(opt("import-rows") ?? "10000");
const RECOMPUTE_ONLY = flag("recompute-only") || process.env.BENCH_RECOMPUTE_ONLY === "1";
const AGENT = "hydrogen-peroxide";
process.env.BETTER_AUTH_SECRET ??= "bench-secret-bench-secret-bench-secret-00";

const log = (s: string) => console.log(s);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const rowsOf = (r: unknown) => (r as { rows: Record<string, unknown>[] }).rows;
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const minOf = (xs: number[]) => Math.min(...xs);
const r1 = (x: number) => Math.round(x * 10) / 10;
const r3 = (x: number) => Math.round(x * 1000) / 1000;
const stats = (xs: number[]) => ({ min: r1(minOf(xs)), median: r1(median(xs)), max: r1(Math.max(...xs)) });

// ---------------------------------------------------------------- recompute vs its bare SQL aggregate (in process)
async function measureRecompute(group: string) {
  const { getDb } = await import("@/db/client");
  const evidence = await import("@/features/evidence/server");
  const { recomputeGroupAgent, summarySql, toleratedCountsSql, doseTrialsSql } = evidence;
  // pairFiguresSql: the one statement the recompute is fed by (where this tree has it; older trees fed the
  // recompute with two statements, the summary statement and the dose aggregate).
  const pairFiguresSql = (evidence as Record<string, unknown>).pairFiguresSql as
    ((g: string, a: string, e: number[]) => ReturnType<typeof summarySql>) | undefined;
  const { medianRank } = await import("@/features/evidence");
  const db = await getDb();
  const [{ band_edges: edges }] = rowsOf(
    await db.execute(sql`select band_edges from agents where slug = ${AGENT}`),
  ) as [{ band_edges: number[] }];
  const ranks = new Map<string, { r: number; n: number }>();
  for (const k of rowsOf(await db.execute(toleratedCountsSql(group, AGENT)))) {
    const rank = medianRank(Number(k.n), 95);
    if (rank) ranks.set(k.whole ? "*all*" : String(k.c ?? ""), { r: rank.r, n: Number(k.n) });
  }
  const tolerated = sql.raw(
    "(not (coalesce(r.fish_lost, 0) > 0 and coalesce(r.loss_cause, 'unknown') in ('treatment', 'unknown')) and coalesce(r.distress, 'none') <> 'severe')",
  );
  const acceptedHere = sql`r.status = 'accepted' and r.group_slug = ${group} and r.agent_slug = ${AGENT} and r.concentration is not null`;
  // bare: the SQL aggregate the recompute is fed by, run alone. recompute: everything an accept sets off for the
  // pair — settings, that aggregate, the dose–response fits of every condition set, assembling, and replacing the
  // stored rows in a transaction under the pair's lock. Also timed alone, for comparison: the summary statement
  // (every figure but the fit's input) and the dose aggregate (the fit's input) as separate scans.
  const steps = {
    bare: () =>
      pairFiguresSql
        ? db.execute(pairFiguresSql(group, AGENT, edges))
        : Promise.all([
            db.execute(summarySql(group, AGENT, edges, ranks)),
            db.execute(doseTrialsSql(acceptedHere, tolerated)),
          ]),
    recompute: () => recomputeGroupAgent(db, group, AGENT),
    summaryOnly: () => db.execute(summarySql(group, AGENT, edges, ranks)),
    doseSql: () => db.execute(doseTrialsSql(acceptedHere, tolerated)),
  };
  const names = Object.keys(steps) as (keyof typeof steps)[];
  const times = Object.fromEntries(names.map((n) => [n, [] as number[]])) as Record<keyof typeof steps, number[]>;
  for (const n of names) for (let i = 0; i < 2; i++) await steps[n](); // warm-up
  const PAIRS = 9;
  const ratios: number[] = [];
  for (let i = 0; i < PAIRS; i++) {
    // Rotate the order so no step always runs on a warmer cache.
    const order = names.map((_, k) => names[(k + i) % names.length]!);
    const t: Record<string, number> = {};
    for (const n of order) {
      const t0 = performance.now();
      await steps[n]();
      t[n] = performance.now() - t0;
      times[n].push(t[n]!);
    }
    ratios.push(t.recompute! / t.bare!);
  }
  const [{ n }] = rowsOf(
    await db.execute(sql`select count(*)::int as n from reports where group_slug = ${group} and status = 'accepted'`),
  ) as [{ n: number }];
  const [{ fitted }] = rowsOf(
    await db.execute(
      sql`select count(*) filter (where summary->'doseResponse'->>'bmd' is not null)::int as fitted from evidence_summaries where group_slug = ${group} and agent_slug = ${AGENT}`,
    ),
  ) as [{ fitted: number }];
  return {
    group,
    reportsInGroup: n,
    fittedSets: fitted,
    fedBy: pairFiguresSql ? "one statement (pairFiguresSql)" : "two statements (summarySql + doseTrialsSql)",
    bareMs: stats(times.bare),
    recomputeMs: stats(times.recompute),
    summaryOnlyMs: stats(times.summaryOnly),
    doseSqlMs: stats(times.doseSql),
    ratio: { min: r3(minOf(ratios)), median: r3(median(ratios)) },
  };
}

// ---------------------------------------------------------------- the server under test
interface Server {
  child: ChildProcess;
  pid: number;
  base: string;
  port: number;
  startupMs: number;
  liveMs: number;
  log: () => string;
}

async function startServer(dir: string): Promise<Server> {
  const port = await freePort();
  const base = `http://localhost:${port}`;
  const t0 = performance.now();
  // Exactly `npm start`: tsx --conditions=react-server db/start.ts (which builds if needed, then serves).
  const child = spawn(
    process.execPath,
    [path.join("node_modules", "tsx", "dist", "cli.mjs"), "--conditions=react-server", "db/start.ts"],
    {
      env: { ...process.env, NODE_ENV: "production", DATA_DIR: dir, PORT: String(port), BETTER_AUTH_URL: base },
      stdio: ["ignore", "pipe", "pipe"],
    },
  );
  let out = "";
  child.stdout!.on("data", (d) => (out = (out + d).slice(-20000)));
  child.stderr!.on("data", (d) => (out = (out + d).slice(-20000)));
  let liveMs = 0;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited (${child.exitCode}) while starting:\n${out}`);
    if (performance.now() - t0 > 600_000) throw new Error(`the server did not become ready in 10 minutes:\n${out}`);
    await sleep(100);
    if (
      !liveMs &&
      (await fetch(`${base}/api/health/live`).then(
        (r) => r.ok,
        () => false,
      ))
    )
      liveMs = performance.now() - t0;
    if (
      liveMs &&
      (await fetch(`${base}/api/health`).then(
        (r) => r.ok,
        () => false,
      ))
    )
      break;
  }
  return { child, pid: child.pid!, base, port, startupMs: performance.now() - t0, liveMs, log: () => out };
}

async function stopServer(s: Server): Promise<void> {
  const pids = treeOf(s.pid).map((p) => p.pid);
  s.child.kill("SIGTERM");
  for (let i = 0; i < 300 && pids.some(alive); i++) await sleep(100);
  for (const pid of pids.filter(alive)) process.kill(pid, "SIGKILL"); // only the processes this bench started
  for (let i = 0; i < 300 && pids.some(alive); i++) await sleep(100);
}
/** Alive and not a zombie waiting to be reaped (which holds no lock any more). */
function alive(pid: number) {
  try {
    return !/\) Z /.test(fs.readFileSync(`/proc/${pid}/stat`, "utf8"));
  } catch {
    return false;
  }
}

/** Waits until /api/health/live answers ten times in a row within 250 ms (a start-up recompute may hold it). */
async function settle(s: Server): Promise<number> {
  const t0 = performance.now();
  let streak = 0;
  while (streak < 10 && performance.now() - t0 < 600_000) {
    const r = await get(`${s.base}/api/health/live`).catch(() => ({ ms: Infinity }));
    streak = r.ms < 250 ? streak + 1 : 0;
    await sleep(100);
  }
  return Math.round(performance.now() - t0);
}

/** One GET read to the end: status, bytes of body (as sent, with or without gzip), ms. */
function get(
  url: string,
  headers: Record<string, string> = {},
): Promise<{ status: number; bytes: number; ms: number; lines: number }> {
  return new Promise((resolve, reject) => {
    const t0 = performance.now();
    const req = http.get(url, { headers, agent: false }, (res) => {
      let bytes = 0,
        lines = 0;
      res.on("data", (c: Buffer) => {
        bytes += c.length;
        for (let i = c.indexOf(10); i >= 0; i = c.indexOf(10, i + 1)) lines++;
      });
      res.on("end", () => resolve({ status: res.statusCode ?? 0, bytes, ms: performance.now() - t0, lines }));
      res.on("error", reject);
    });
    req.on("error", reject);
    req.setTimeout(900_000, () => req.destroy(new Error("timed out")));
  });
}

async function signIn(base: string, email: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in/email`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: base },
    body: JSON.stringify({ email, password: BENCH_PASSWORD }),
  });
  if (!res.ok) throw new Error(`sign-in of ${email} failed: ${res.status} ${await res.text()}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .filter((c) => !c!.endsWith("="))
    .join("; ");
}

/** Polls a route back to back (a pause between) until stopped: the longest wait, failures, count. */
function prober(url: string, pauseMs: number) {
  let running = true,
    longest = 0,
    failures = 0,
    count = 0;
  const done = (async () => {
    while (running) {
      const t0 = performance.now();
      try {
        const r = await fetch(url, { signal: AbortSignal.timeout(300_000) });
        await r.arrayBuffer();
        if (!r.ok) failures++;
      } catch {
        failures++;
      }
      longest = Math.max(longest, performance.now() - t0);
      count++;
      await sleep(pauseMs);
    }
  })();
  return {
    async stop() {
      running = false;
      await done;
      return { longestMs: Math.round(longest), failures, count };
    },
  };
}

// ---------------------------------------------------------------- HTTP measurements
async function measureRoutes(s: Server, routes: Record<string, string>) {
  const names = Object.keys(routes);
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
  const out: Record<string, any> = {};
  // Bytes as sent: without and with gzip (what a browser accepts).
  for (const n of names) {
    const plain = await get(s.base + routes[n]);
    const gz = await get(s.base + routes[n], { "accept-encoding": "gzip" });
    if (plain.status !== 200) throw new Error(`${routes[n]} answered ${plain.status}`);
    out[n] = {
      path: routes[n],
      bytes: plain.bytes,
      gzipBytes: gz.bytes,
      serialMs: [] as number[],
      cpuMsSerial: [] as number[],
      rps: [] as number[],
      p50: [] as number[],
      p99: [] as number[],
      cpuMsPerReq: [] as number[],
      errors: 0,
    };
  }
  // Warm-up: every route under load, so no route is measured on a colder server than the others.
  for (const n of names) await autocannon({ url: s.base + routes[n], connections: CONNECTIONS, duration: 2 });
  for (let round = 0; round < ROUNDS; round++) {
    const order = names.map((_, k) => names[(k + round) % names.length]!);
    // Serial latency: one request at a time, 10 per route, on an otherwise idle server.
    for (const n of order) {
      const cpu0 = treeCpuMs(s.pid);
      for (let i = 0; i < 10; i++) out[n].serialMs.push((await get(s.base + routes[n])).ms);
      out[n].cpuMsSerial.push((treeCpuMs(s.pid) - cpu0) / 10);
    }
    for (const n of order) {
      const cpu0 = treeCpuMs(s.pid);
      const r = await autocannon({ url: s.base + routes[n], connections: CONNECTIONS, duration: SECONDS });
      const cpu = treeCpuMs(s.pid) - cpu0;
      const done = r["2xx"] + r.non2xx;
      out[n].rps.push(r.requests.average);
      out[n].p50.push(r.latency.p50);
      out[n].p99.push(r.latency.p99);
      out[n].cpuMsPerReq.push(done ? cpu / done : NaN);
      out[n].errors += r.errors + r.non2xx;
    }
    log(`    round ${round + 1}: ${order.map((n) => `${n} ${Math.round(out[n].rps.at(-1))}/s`).join(", ")}`);
  }
  const trivial = out.trivial;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
  const result: Record<string, any> = {};
  for (const n of names) {
    const o = out[n];
    const ratios = o.rps.map((x: number, i: number) => x / trivial.rps[i]);
    result[n] = {
      path: o.path,
      bytes: o.bytes,
      gzipBytes: o.gzipBytes,
      serialMs: stats(o.serialMs),
      cpuMsPerReqSerial: r1(median(o.cpuMsSerial)),
      rps: { min: r1(minOf(o.rps)), median: r1(median(o.rps)) },
      ratioToTrivial: { min: r3(minOf(ratios)), median: r3(median(ratios)) },
      p50Ms: median(o.p50),
      p99Ms: median(o.p99),
      cpuMsPerReq: r3(median(o.cpuMsPerReq)),
      errors: o.errors,
    };
  }
  return result;
}

/** Sequential writes, each timed, with the tree's CPU per request. */
async function timed(s: Server, n: number, fn: (i: number) => Promise<Response>) {
  const ms: number[] = [];
  const cpu0 = treeCpuMs(s.pid);
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    const res = await fn(i);
    const text = await res.text();
    if (!res.ok) throw new Error(`answer ${res.status}: ${text.slice(0, 500)}`);
    ms.push(performance.now() - t0);
  }
  return { ms, cpuMsPerReq: (treeCpuMs(s.pid) - cpu0) / n };
}

async function measureWrites(s: Server, member: string, moderator: string) {
  const body = (i: number) => ({
    speciesId: "paracheirodon-innesi",
    fishCount: 6,
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-11-02",
    water: { volume: 40, volumeUnit: "L", temperature: 25, temperatureUnit: "C", ph: 7.0, setting: "bare" },
    treatment: {
      agentSlug: AGENT,
      stockPercent: 3,
      stockBasis: "w/v",
      amountMl: 20 + (i % 20),
      doses: 3,
      intervalHours: 48,
    },
    outcome: {
      fishLost: 0,
      lossCause: null,
      distress: "mild",
      condition: "cleared",
      observedDaysAfter: 7,
      notes: `Bench report ${i}.`,
    },
    showName: false,
    submit: true,
  });
  const N = 20;
  const ids: string[] = [];
  const submit = await timed(s, 2 * N, async (i) => {
    const res = await fetch(`${s.base}/api/reports`, {
      method: "POST",
      headers: { "content-type": "application/json", cookie: member, origin: s.base },
      body: JSON.stringify(body(i)),
    });
    const clone = res.clone();
    if (res.ok) ids.push(((await clone.json()) as { id: string }).id);
    return res;
  });
  // Accept and return alternate, so both see the same server state (an accept wakes the evidence worker).
  const accept: number[] = [],
    ret: number[] = [];
  const cpu = { accept: 0, return: 0 };
  for (let i = 0; i < 2 * N; i++) {
    const decision =
      i % 2 === 0 ? { decision: "accept" } : { decision: "return", note: "Please add the water test results." };
    const c0 = treeCpuMs(s.pid);
    const r = await timed(s, 1, () =>
      fetch(`${s.base}/api/reports/${ids[i]}/decision`, {
        method: "POST",
        headers: { "content-type": "application/json", cookie: moderator, origin: s.base },
        body: JSON.stringify(decision),
      }),
    );
    (i % 2 === 0 ? accept : ret).push(r.ms[0]!);
    cpu[i % 2 === 0 ? "accept" : "return"] += treeCpuMs(s.pid) - c0;
  }
  return {
    submitMs: stats(submit.ms),
    submitCpuMs: r1(submit.cpuMsPerReq),
    acceptMs: stats(accept),
    acceptCpuMs: r1(cpu.accept / N),
    returnMs: stats(ret),
    returnCpuMs: r1(cpu.return / N),
  };
}

/** Makes this run's import rows new to a reused directory (an earlier run's rows would all be skipped as present). */
const RUN_ID = Date.now().toString(36);

function importCsv(rows: number): string {
  const header =
    "status,reporter,species_id,fish_count,size_class,condition_slug,started_on,water_volume,water_volume_unit,temperature,temperature_unit,setting,agent_slug,stock_percent,amount_ml,doses,fish_lost,loss_cause,distress,condition_outcome,observed_days_after,notes";
  const species = ["poecilia-reticulata", "paracheirodon-innesi"];
  return [
    header,
    ...Array.from(
      { length: rows },
      (_, n) =>
        `accepted,member-bench${n % 60},${species[n % 2]},${3 + (n % 9)},adult,white-spot,2017-0${1 + (n % 9)}-1${n % 10},60,L,25,C,bare,${AGENT},3,${20 + (n % 50)},1,0,,mild,cleared,7,bench import ${RUN_ID} row ${n}`,
    ),
  ].join("\n");
}

async function measureImport(s: Server, admin: string) {
  const csv = importCsv(IMPORT_ROWS);
  const live = prober(`${s.base}/api/health/live`, 50);
  const list = prober(`${s.base}/api/summaries?agent=${AGENT}`, 200);
  const cpu0 = treeCpuMs(s.pid);
  const t0 = performance.now();
  const res = await fetch(`${s.base}/api/import/reports`, {
    method: "POST",
    headers: { "content-type": "text/csv", cookie: admin, origin: s.base },
    body: csv,
    signal: AbortSignal.timeout(1_800_000),
  });
  const answer = (await res.json()) as { imported?: number; error?: unknown };
  const ms = performance.now() - t0;
  const cpuMs = treeCpuMs(s.pid) - cpu0;
  const [l, sm] = [await live.stop(), await list.stop()];
  if (!res.ok) throw new Error(`import answered ${res.status}: ${JSON.stringify(answer).slice(0, 500)}`);
  return {
    rows: answer.imported,
    ms: Math.round(ms),
    serverCpuMs: Math.round(cpuMs),
    longestLiveMs: l.longestMs,
    liveFailures: l.failures,
    liveProbes: l.count,
    longestSummariesMs: sm.longestMs,
    summariesFailures: sm.failures,
  };
}

/** "app 281 → 452, database 379 → 395, …" from an export's per-process figures. */
function roles(e: { rssAtStartMb?: Record<string, number>; peakRssMb?: Record<string, number> }): string {
  const peak = e.peakRssMb ?? {};
  return Object.keys(peak)
    .sort((a, b) => peak[b]! - peak[a]!)
    .map((k) => `${k} ${e.rssAtStartMb?.[k] ?? "?"} → ${peak[k]}`)
    .join(", ");
}

async function measureExport(s: Server, moderator: string) {
  const before = treePeaks(s.pid);
  const baseline = before.reduce((sum, p) => sum + p.peakMb, 0);
  const sampler = rssSampler(s.pid, 100);
  const byRole = rssSamplerByRole(s.pid, 100);
  const startRss = Object.fromEntries(treeOf(s.pid).map((p) => [roleOf(p.pid), Math.round(rssMbOf(p.pid))]));
  const live = prober(`${s.base}/api/health/live`, 200);
  const cpu0 = treeCpuMs(s.pid);
  const r = await get(`${s.base}/api/export/reports.csv`, { cookie: moderator });
  const cpuMs = treeCpuMs(s.pid) - cpu0;
  const peakTreeRssMb = sampler.stop();
  const peakByRole = byRole.stop();
  const l = await live.stop();
  if (r.status !== 200) throw new Error(`export answered ${r.status}`);
  const peaks = treePeaks(s.pid);
  return {
    ms: Math.round(r.ms),
    rows: r.lines - 2,
    mb: r1(r.bytes / 1024 / 1024),
    serverCpuMs: Math.round(cpuMs),
    peakTreeRssMb: Math.round(peakTreeRssMb),
    // Each process's RSS when the export began and its highest during the export: "flat" means these stay close.
    rssAtStartMb: startRss,
    peakRssMb: peakByRole,
    vmHwmBeforeMb: Math.round(baseline),
    vmHwmMb: peaks.map((p) => `${p.name}:${Math.round(p.peakMb)}`).join(" "),
    longestLiveMs: l.longestMs,
    liveFailures: l.failures,
  };
}

// ---------------------------------------------------------------- one N
async function runOne(reports: number) {
  // --reuse DIR: a data directory an earlier run seeded (and left behind); nothing is seeded and it is kept.
  const reuse = opt("reuse");
  const dir = reuse ? path.resolve(reuse) : fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-bench-"));
  process.env.DATA_DIR = dir;
  const { getDb, closeDb } = await import("@/db/client");
  const { recomputeAll } = await import("@/features/evidence/server");
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
  const res: Record<string, any> = { reports };
  try {
    log(`\n== ${reports.toLocaleString("en")} accepted reports (data in ${dir})`);
    const db = await getDb();
    let t = performance.now();
    if (!reuse) await seedBench(db, reports, log);
    else
      res.reports = Number(
        (
          rowsOf(await db.execute(sql`select count(*)::int as n from reports where status = 'accepted'`))[0] as {
            n: number;
          }
        ).n,
      );
    res.seedS = r1((performance.now() - t) / 1000);
    // The statistics a bulk load leaves stale are refreshed, as the app's own import does after its batches.
    t = performance.now();
    if (reuse) log(`  reusing ${dir}: ${res.reports} accepted reports`);
    await db.execute(sql`analyze`);
    res.analyzeS = r1((performance.now() - t) / 1000);
    t = performance.now();
    await recomputeAll(db);
    res.recomputeAllS = r1((performance.now() - t) / 1000);
    log(`  seeded in ${res.seedS} s, analyze ${res.analyzeS} s, every summary recomputed in ${res.recomputeAllS} s`);
    const [{ group }] = rowsOf(
      await db.execute(
        sql`select group_slug as "group" from reports where status = 'accepted' group by group_slug order by count(*) desc, group_slug limit 1`,
      ),
    ) as [{ group: string }];
    res.recompute = await measureRecompute(group);
    const rc = res.recompute;
    log(
      `  recompute of ${group} (${rc.reportsInGroup} reports, ${rc.fittedSets} fitted condition sets): ${rc.recomputeMs.median} ms (min ${rc.recomputeMs.min}); bare SQL aggregate ${rc.bareMs.median} ms (min ${rc.bareMs.min}); ` +
        `ratio median ${rc.ratio.median} (min ${rc.ratio.min}); fed by ${rc.fedBy}; alone: the summary statement ${rc.summaryOnlyMs.median} ms, the dose aggregate ${rc.doseSqlMs.median} ms`,
    );
    const diskOf = async () => {
      const [{ size }] = rowsOf(await db.execute(sql`select pg_database_size(current_database())::bigint as size`)) as [
        { size: number },
      ];
      const disk = dirBytes(dir, "pg_wal");
      return {
        dataDirMb: r1(disk.total / 1024 ** 2),
        walMb: r1(disk.sub / 1024 ** 2),
        databaseMb: r1(Number(size) / 1024 ** 2),
        ratio: r3(disk.total / Number(size)),
      };
    };
    // The app's database process checkpoints every minute and after imports; measure the directory as it leaves it.
    await db.execute(sql`checkpoint`);
    res.diskAfterSeed = await diskOf();
    log(
      `  after seeding: data directory ${res.diskAfterSeed.dataDirMb} MB (write-ahead log ${res.diskAfterSeed.walMb} MB) for ${res.diskAfterSeed.databaseMb} MB of database`,
    );
    await closeDb();
    if (RECOMPUTE_ONLY) return res;

    // Sources edited since the bench began would make db/start.ts build first: build here, outside the start-up time.
    (await import("@/db/serve")).buildIfNeeded();
    const server = await startServer(dir);
    res.startupMs = Math.round(server.startupMs);
    res.liveAfterMs = Math.round(server.liveMs);
    log(
      `  start-up (npm start → /api/health 200): ${res.startupMs} ms (first /api/health/live after ${res.liveAfterMs} ms)`,
    );
    res.settleMs = await settle(server);
    log(`  then ${res.settleMs} ms until /api/health/live answered ten times in a row within 250 ms`);
    try {
      const [admin, moderator, member] = await Promise.all(benchPeople.map((p) => signIn(server.base, p.email)));
      const routes = {
        trivial: "/api/health/live",
        summaries: `/api/summaries?agent=${AGENT}`,
        groupApi: `/api/summaries/${group}?agent=${AGENT}`,
        groupPage: `/evidence/${group}?agent=${AGENT}`,
        evidenceIndex: `/evidence?agent=${AGENT}`,
      };
      // Each phase on its own: one that fails is reported with its error, and the others still run.
      // eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
      const phase = async (name: string, fn: () => Promise<unknown>, say: (r: any) => string) => {
        try {
          res[name] = await fn();
          log(say(res[name]));
        } catch (err) {
          res[name] = { error: err instanceof Error ? err.message.slice(0, 300) : String(err) };
          log(`  ${name} FAILED: ${res[name].error}`);
        }
      };
      await phase(
        "routes",
        () => measureRoutes(server, routes),
        () => "  routes measured",
      );
      await phase(
        "writes",
        () => measureWrites(server, member!, moderator!),
        (w) =>
          `  submit ${w.submitMs.median} ms, accept ${w.acceptMs.median} ms, return ${w.returnMs.median} ms (medians)`,
      );
      await sleep(2000); // let the evidence worker finish the accepts' recomputes
      await phase(
        "import",
        () => measureImport(server, admin!),
        (i) =>
          `  import of ${i.rows} rows: ${(i.ms / 1000).toFixed(1)} s; longest /api/health/live wait ${i.longestLiveMs} ms (${i.liveFailures} failed), /api/summaries ${i.longestSummariesMs} ms`,
      );
      await sleep(2000);
      await phase(
        "export",
        () => measureExport(server, moderator!),
        (e) =>
          `  export of ${e.rows} reports (${e.mb} MB): ${(e.ms / 1000).toFixed(1)} s; server tree RSS peak ${e.peakTreeRssMb} MB; per process at the start → peak during it: ${roles(e)}; longest liveness wait ${e.longestLiveMs} ms`,
      );
    } catch (err) {
      console.error(`  the server's last output:\n${server.log()}`);
      throw err;
    } finally {
      res.serverPeakMb = treePeaks(server.pid)
        .map((p) => `${p.name}:${Math.round(p.peakMb)}`)
        .join(" ");
      await stopServer(server);
    }
    // Disk: the data directory against the live data (reopened after the server let go of it).
    const db2 = await getDb();
    const [{ size }] = rowsOf(await db2.execute(sql`select pg_database_size(current_database())::bigint as size`)) as [
      { size: number },
    ];
    await closeDb();
    const disk = dirBytes(dir, "pg_wal");
    res.disk = {
      dataDirMb: r1(disk.total / 1024 ** 2),
      walMb: r1(disk.sub / 1024 ** 2),
      databaseMb: r1(Number(size) / 1024 ** 2),
      ratio: r3(disk.total / Number(size)),
    };
    log(
      `  data directory ${res.disk.dataDirMb} MB (write-ahead log ${res.disk.walMb} MB) for ${res.disk.databaseMb} MB of database: ratio ${res.disk.ratio}`,
    );
    return res;
  } finally {
    await closeDb().catch(() => {});
    if (!reuse) fs.rmSync(dir, { recursive: true, force: true });
  }
}

// ---------------------------------------------------------------- main
const started = new Date();
const before = machine();
if (!RECOMPUTE_ONLY) {
  const { buildIfNeeded } = await import("@/db/serve");
  buildIfNeeded();
}
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
const runs: Record<string, any>[] = [];
for (const n of REPORTS) runs.push(await runOne(n));
const after = machine();

// The per-N table.
const cols = runs.map((r) => r.reports.toLocaleString("en"));
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- bench records hold figures of many shapes, printed as JSON
const row = (label: string, f: (r: Record<string, any>) => string) =>
  `| ${label} | ${runs
    .map((r) => {
      try {
        return f(r);
      } catch {
        return "—";
      }
    })
    .join(" | ")} |`;
const route = (n: string, what: string) => [
  row(
    `${what}: req/s (min–median), vs trivial`,
    (r) =>
      `${r.routes[n].rps.min}–${r.routes[n].rps.median}; ${r.routes[n].ratioToTrivial.median} (min ${r.routes[n].ratioToTrivial.min})`,
  ),
  row(
    `${what}: serial ms (min/median); CPU ms/req`,
    (r) => `${r.routes[n].serialMs.min}/${r.routes[n].serialMs.median}; ${r.routes[n].cpuMsPerReq}`,
  ),
];
const table = [
  `| measure | ${cols.join(" | ")} |`,
  `|---|${cols.map(() => "---").join("|")}|`,
  row("seed; every summary recomputed (s)", (r) => `${r.seedS}; ${r.recomputeAllS}`),
  row(
    "recompute vs bare aggregate, ms (median)",
    (r) => `${r.recompute.recomputeMs.median} vs ${r.recompute.bareMs.median}`,
  ),
  row("recompute ratio (median, min)", (r) => `${r.recompute.ratio.median}, ${r.recompute.ratio.min}`),
  row("start-up ms; then until liveness is prompt", (r) => `${r.startupMs}; ${r.settleMs}`),
  row(
    "trivial: req/s (min–median); CPU ms/req",
    (r) => `${r.routes.trivial.rps.min}–${r.routes.trivial.rps.median}; ${r.routes.trivial.cpuMsPerReq}`,
  ),
  ...route("summaries", "summaries list"),
  ...route("groupApi", "group API"),
  ...route("groupPage", "group page"),
  ...route("evidenceIndex", "evidence index"),
  row(
    "group API / page bytes (gzip)",
    (r) =>
      `${r.routes.groupApi.bytes} (${r.routes.groupApi.gzipBytes}) / ${r.routes.groupPage.bytes} (${r.routes.groupPage.gzipBytes})`,
  ),
  row(
    "submit / accept / return ms (median)",
    (r) => `${r.writes.submitMs.median} / ${r.writes.acceptMs.median} / ${r.writes.returnMs.median}`,
  ),
  row(
    "import 10k: s; longest live wait ms",
    (r) => `${r1(r.import.ms / 1000)}; ${r.import.longestLiveMs} (${r.import.liveFailures} failed)`,
  ),
  row(
    "export: s; peak tree RSS MB; per process MB (start → peak); longest live wait ms",
    (r) => `${r1(r.export.ms / 1000)}; ${r.export.peakTreeRssMb}; ${roles(r.export)}; ${r.export.longestLiveMs}`,
  ),
  row(
    "data dir / database MB (ratio), after seeding",
    (r) => `${r.diskAfterSeed.dataDirMb} / ${r.diskAfterSeed.databaseMb} (${r.diskAfterSeed.ratio})`,
  ),
  row(
    "data dir / database MB (ratio), at the end",
    (r) => `${r.disk.dataDirMb} / ${r.disk.databaseMb} (${r.disk.ratio}); WAL ${r.disk.walMb}`,
  ),
];
log(
  `\nMachine: ${before.cpu}, ${before.memoryGb} GB, Node ${before.node}; load average ${before.loadAverage.join(" ")} at the start, ${after.loadAverage.join(" ")} at the end.`,
);
log(table.join("\n"));
log(
  JSON.stringify({
    bench: "tanklore",
    started: started.toISOString(),
    seconds: Math.round((Date.now() - started.getTime()) / 1000),
    machine: { ...before, loadAverageEnd: after.loadAverage },
    options: { seconds: SECONDS, rounds: ROUNDS, connections: CONNECTIONS, importRows: IMPORT_ROWS },
    runs,
  }),
);
process.exit(0);
