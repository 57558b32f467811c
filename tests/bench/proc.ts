// Reads CPU time and memory of the server under test from /proc (Linux). The server is a process tree — `npm start`'s
// launcher, the Next.js server it spawns and, where the database runs in its own process, that process too — so
// every figure is summed over the spawned process and all its descendants, found afresh at each reading.
import fs from "node:fs";
import os from "node:os";

const TICKS_PER_SECOND = 100; // USER_HZ: 100 on every Linux the bench runs on

interface Stat {
  pid: number;
  ppid: number;
  name: string;
  cpuMs: number;
}

function readStat(pid: number): Stat | null {
  try {
    const s = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    // The command name is in parentheses and may hold spaces: split after the last ")".
    const close = s.lastIndexOf(")");
    const name = s.slice(s.indexOf("(") + 1, close);
    const f = s.slice(close + 2).split(" ");
    // Fields after the name start at field 3 (state): ppid is field 4, utime 14, stime 15.
    const ppid = Number(f[1]);
    const ticks = Number(f[11]) + Number(f[12]);
    return { pid, ppid, name, cpuMs: (ticks * 1000) / TICKS_PER_SECOND };
  } catch {
    return null; // gone between listing and reading
  }
}

/** The process and every live descendant. */
export function treeOf(root: number): Stat[] {
  const all: Stat[] = [];
  for (const e of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(e)) continue;
    const st = readStat(Number(e));
    if (st) all.push(st);
  }
  const children = new Map<number, Stat[]>();
  for (const st of all) children.set(st.ppid, [...(children.get(st.ppid) ?? []), st]);
  const out: Stat[] = [];
  const rootStat = all.find((s) => s.pid === root);
  if (!rootStat) return out;
  const stack = [rootStat];
  while (stack.length) {
    const s = stack.pop()!;
    out.push(s);
    stack.push(...(children.get(s.pid) ?? []));
  }
  return out;
}

/** CPU time (user + system, ms) used so far by the tree's live processes. */
export function treeCpuMs(root: number): number {
  return treeOf(root).reduce((sum, s) => sum + s.cpuMs, 0);
}

function statusKb(pid: number, field: "VmRSS" | "VmHWM"): number {
  try {
    const m = new RegExp(`${field}:\\s+(\\d+)`).exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) : 0;
  } catch {
    return 0;
  }
}

/** Resident memory now, summed over the tree, MB. */
export function treeRssMb(root: number): number {
  return treeOf(root).reduce((sum, s) => sum + statusKb(s.pid, "VmRSS"), 0) / 1024;
}

/** Each process's own peak resident memory since it started (VmHWM), MB, largest first. */
export function treePeaks(root: number): { pid: number; name: string; peakMb: number }[] {
  return treeOf(root)
    .map((s) => ({ pid: s.pid, name: s.name, peakMb: statusKb(s.pid, "VmHWM") / 1024 }))
    .sort((a, b) => b.peakMb - a.peakMb);
}

/** Samples the tree's summed RSS every `everyMs` until stopped; returns the highest sample. */
export function rssSampler(root: number, everyMs = 100): { stop: () => number } {
  let peak = treeRssMb(root);
  const t = setInterval(() => (peak = Math.max(peak, treeRssMb(root))), everyMs);
  return {
    stop() {
      clearInterval(t);
      return Math.max(peak, treeRssMb(root));
    },
  };
}

/** Bytes under a directory (apparent file sizes), and those under one subfolder name at any depth. */
export function dirBytes(dir: string, sub?: string): { total: number; sub: number } {
  let total = 0,
    inSub = 0;
  const walk = (p: string, inside: boolean) => {
    for (const e of fs.readdirSync(p, { withFileTypes: true })) {
      const q = `${p}/${e.name}`;
      if (e.isDirectory()) walk(q, inside || e.name === sub);
      else if (e.isFile()) {
        const size = fs.statSync(q).size;
        total += size;
        if (inside) inSub += size;
      }
    }
  };
  walk(dir, false);
  return { total, sub: inSub };
}

/** What the figures were measured on. */
export function machine() {
  const cpus = os.cpus();
  return {
    cpu: `${cpus.length} × ${cpus[0]?.model.trim() ?? "unknown"}`,
    memoryGb: Math.round(os.totalmem() / 1024 ** 3),
    node: process.version,
    kernel: os.release(),
    loadAverage: os.loadavg().map((x) => Number(x.toFixed(2))),
  };
}

/** What a process of the server's tree is, from its command line: the app, the database process, the launcher. */
export function roleOf(pid: number): string {
  let cmd: string;
  try {
    cmd = fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").replaceAll("\0", " ");
  } catch {
    return "gone";
  }
  if (cmd.includes("database-process")) return "database";
  if (cmd.includes("http-server")) return "app";
  if (cmd.includes("db/start.ts") || cmd.includes("db/demo.ts")) return "launcher";
  if (cmd.includes("db/migrate.ts")) return "migrations";
  return cmd.split(" ")[0]!.split("/").pop() || "other";
}

/**
 * Samples each process's RSS every `everyMs` until stopped; returns each role's highest sample in this window (not
 * its lifetime peak, VmHWM, which an earlier phase may have set).
 */
export function rssSamplerByRole(root: number, everyMs = 100): { stop: () => Record<string, number> } {
  const peaks: Record<string, number> = {};
  const sample = () => {
    for (const s of treeOf(root)) {
      const role = roleOf(s.pid);
      const mb = statusKb(s.pid, "VmRSS") / 1024;
      if (mb > (peaks[role] ?? 0)) peaks[role] = Math.round(mb);
    }
  };
  sample();
  const t = setInterval(sample, everyMs);
  return {
    stop() {
      clearInterval(t);
      sample();
      return peaks;
    },
  };
}

/** One process's resident memory now, in MB. */
export function rssMbOf(pid: number): number {
  return statusKb(pid, "VmRSS") / 1024;
}
