import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { describe, expect, inject, it } from "vitest";

// The reports export streams keyset-paginated chunks, and the database runs in its own process: the app server's
// memory stays flat however many reports there are. Seeds EXPORT_REPORTS (default 100,000) through the database
// process's socket, streams the export from the server of `npm start`, and samples both processes' RSS.
const base = () => inject("baseUrl");
const N = Number(process.env.EXPORT_REPORTS ?? 100_000);

/** The pid of the process serving DATA_DIR's app (db/http-server.ts), found by its environment. */
function appPid(dataDir: string): number {
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const cmd = fs.readFileSync(`/proc/${entry}/cmdline`, "utf8");
      if (!cmd.includes("http-server.ts")) continue;
      if (fs.readFileSync(`/proc/${entry}/environ`, "utf8").split("\0").includes(`DATA_DIR=${dataDir}`))
        return Number(entry);
    } catch {
      // gone, or not ours to read
    }
  }
  throw new Error("the app's process was not found");
}
const rssMb = (pid: number) => Number(/VmRSS:\s+(\d+)/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"))![1]) / 1024;

describe("the reports export", () => {
  it(`streams ${N} reports with the app server's memory flat (under 600 MB)`, { timeout: 1_200_000 }, async () => {
    const dataDir = inject("dataDir");
    const client = new pg.Client({
      connectionString: fs.readFileSync(path.join(dataDir, "pgdata.address"), "utf8").trim(),
    });
    await client.connect();
    try {
      const n = (await client.query<{ n: number }>("select count(*)::int as n from reports")).rows[0]!.n;
      const author = (await client.query<{ id: string }>("select id from users where role = 'admin' limit 1")).rows[0]!
        .id;
      await client.query(
        `insert into reports (id, author_id, status, source, species_id, group_slug, fish_count, size_class, condition_slug, started_on,
                              water_volume, water_volume_unit, volume_l, temperature, temperature_unit, temperature_c, setting,
                              agent_slug, stock_percent, stock_basis, amount_ml, doses, fish_lost, distress, condition_outcome,
                              observed_days_after, notes, concentration, submitted_at, decided_at)
         select 'mem-' || i, $1, 'accepted', 'demo', 'poecilia-reticulata', 'livebearers', 1 + i % 9, 'adult', 'white-spot', date '2025-01-01' + (i % 600),
                100, 'L', 100, 25, 'C', 25, 'bare', 'hydrogen-peroxide', 3, 'w/v', 10 + i % 40, 1, 0, 'mild', 'cleared', 7,
                'Memory probe report ' || i, 3 + i % 12, now(), now()
           from generate_series(1, $2::int) i`,
        [author, Math.max(0, N - n)],
      );
      await client.query("analyze reports");
    } finally {
      await client.end();
    }
    const signIn = await fetch(`${base()}/api/auth/sign-in/email`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: base() },
      body: JSON.stringify({ email: "admin@example.org", password: inject("demoPassword") }),
    });
    const cookie = signIn.headers
      .getSetCookie()
      .map((c) => c.split(";")[0]!)
      .join("; ");
    const pid = appPid(dataDir);
    const dbPid = (JSON.parse(fs.readFileSync(path.join(dataDir, "pgdata.lock"), "utf8")) as { pid: number }).pid;
    const before = { app: rssMb(pid), db: rssMb(dbPid) };
    const peak = { ...before };
    const sampler = setInterval(() => {
      peak.app = Math.max(peak.app, rssMb(pid));
      peak.db = Math.max(peak.db, rssMb(dbPid));
    }, 50);
    const t = performance.now();
    const res = await fetch(`${base()}/api/export/reports.csv`, { headers: { cookie } });
    expect(res.status).toBe(200);
    let lines = 0;
    const reader = res.body!.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      for (const b of value) if (b === 10) lines += 1;
    }
    clearInterval(sampler);
    console.log(
      `export of ${lines - 2} reports in ${((performance.now() - t) / 1000).toFixed(1)} s; app RSS ${before.app.toFixed(0)} → peak ${peak.app.toFixed(0)} MB; ` +
        `database process RSS ${before.db.toFixed(0)} → peak ${peak.db.toFixed(0)} MB`,
    );
    expect(lines - 2).toBeGreaterThanOrEqual(N - 200); // drafts are not exported
    expect(peak.app).toBeLessThan(600);
  });
});
