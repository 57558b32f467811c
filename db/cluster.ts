import { execFileSync, spawn, spawnSync, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { startLocalS3, type LocalS3 } from "./s3-local";

/**
 * `npm run cluster`: the several-process shape on one machine, to try it — a throwaway PostgreSQL server in a
 * temporary directory, the local S3 fake, and two app processes (production servers, separate data
 * directories, one shared BETTER_AUTH_SECRET) on two ports. Ctrl+C stops all of it and removes the temp dir.
 * The cluster tests (tests/cluster) start the same parts.
 */

const root = process.cwd();

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

export interface TempPostgres {
  url: string;
  dir: string;
  stop: () => void;
}

/**
 * A PostgreSQL server in a temp directory on a free loopback port. initdb and postgres refuse to run as
 * root, so as root they run as the `postgres` user on a directory it owns (as tests/support/pg-server.ts).
 */
export async function startTempPostgres(): Promise<TempPostgres> {
  if (spawnSync("initdb", ["--version"]).status !== 0 || spawnSync("pg_ctl", ["--version"]).status !== 0) {
    throw new Error(
      "initdb and pg_ctl (the PostgreSQL server binaries) must be on PATH; on Debian: apt-get install postgresql, then add /usr/lib/postgresql/<version>/bin to PATH.",
    );
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-cluster-pg-"));
  const asRoot = process.getuid?.() === 0;
  if (asRoot) execFileSync("chown", ["postgres:postgres", dir]);
  const run = (cmd: string, args: string[]) =>
    asRoot
      ? execFileSync("runuser", ["-u", "postgres", "--", cmd, ...args], { stdio: "pipe" })
      : execFileSync(cmd, args, { stdio: "pipe" });
  const data = path.join(dir, "data");
  run("initdb", ["-D", data, "-A", "trust", "-U", "tanklore", "--no-sync"]);
  const port = await freePort();
  run("pg_ctl", [
    "-D",
    data,
    "-w",
    "-l",
    path.join(dir, "log"),
    "-o",
    `-p ${port} -k ${dir} -h 127.0.0.1 -F -c max_connections=100`,
    "start",
  ]);
  let stopped = false;
  return {
    url: `postgres://tanklore@127.0.0.1:${port}/postgres`,
    dir,
    stop: () => {
      if (stopped) return;
      stopped = true;
      try {
        run("pg_ctl", ["-D", data, "-m", "fast", "-w", "stop"]);
      } catch {
        // Already gone.
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
    },
  };
}

export interface AppProcess {
  name: string;
  url: string;
  port: number;
  dataDir: string;
  child: ChildProcess;
  /** What the process printed (last 200 lines), for a failing test's message. */
  log: string[];
  stop: () => Promise<void>;
}

/** Starts one production app server (db/http-server.ts, as `npm start` does) — the build must exist. */
export async function startApp(
  name: string,
  env: Record<string, string>,
  opts: { port?: number; dataDir: string; echo?: boolean },
): Promise<AppProcess> {
  const port = opts.port ?? (await freePort());
  const url = `http://localhost:${port}`;
  fs.mkdirSync(opts.dataDir, { recursive: true });
  const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "db", "http-server.ts")], {
    cwd: root,
    stdio: ["ignore", "pipe", "pipe"],
    env: {
      ...process.env,
      NODE_ENV: "production",
      NEXT_TELEMETRY_DISABLED: "1",
      PORT: String(port),
      DATA_DIR: opts.dataDir,
      BETTER_AUTH_URL: url,
      ...env,
    },
  });
  const log: string[] = [];
  const take = (chunk: Buffer) => {
    for (const line of chunk.toString().split("\n")) {
      if (!line) continue;
      log.push(line);
      if (log.length > 200) log.shift();
      if (opts.echo) console.log(`[${name}] ${line}`);
    }
  };
  child.stdout!.on("data", take);
  child.stderr!.on("data", take);
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  return {
    name,
    url,
    port,
    dataDir: opts.dataDir,
    child,
    log,
    stop: async () => {
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill("SIGTERM");
      const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
      await exited;
      clearTimeout(timer);
    },
  };
}

/** Waits until the app answers /api/health with 200 (or throws with what it printed). */
export async function waitHealthy(app: AppProcess, timeoutMs = 180_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  let last = "no answer";
  while (Date.now() < until) {
    if (app.child.exitCode !== null)
      throw new Error(`${app.name} exited (${app.child.exitCode}):\n${app.log.slice(-40).join("\n")}`);
    try {
      const res = await fetch(`${app.url}/api/health`);
      if (res.ok) return;
      last = `${res.status} ${await res.text()}`;
    } catch {
      // Not listening yet.
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(
    `${app.name} did not answer /api/health within ${timeoutMs / 1000} s (last: ${last}):\n${app.log.slice(-40).join("\n")}`,
  );
}

/** Builds the app for production when there is no build yet or a source changed since (as `npm start` does). */
export async function ensureBuild(): Promise<void> {
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  const { buildIfNeeded } = await import("./serve");
  buildIfNeeded();
}

export interface Cluster {
  pg: TempPostgres;
  s3: LocalS3;
  apps: AppProcess[];
  secret: string;
  tmp: string;
  stop: () => Promise<void>;
}

/**
 * PostgreSQL, the S3 fake and `count` app processes. With `together`, the processes start at the same moment
 * (the migration lock must let both come up); otherwise the first is healthy before the others start.
 */
export async function startCluster(
  opts: {
    count?: number;
    ports?: number[];
    echo?: boolean;
    together?: boolean;
    extraEnv?: Record<string, string>;
  } = {},
): Promise<Cluster> {
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-cluster-"));
  const pg = await startTempPostgres();
  let s3: LocalS3 | undefined;
  const apps: AppProcess[] = [];
  const secret = crypto.randomBytes(32).toString("base64url");
  const stop = async () => {
    await Promise.all(apps.map((a) => a.stop()));
    await s3?.close().catch(() => undefined);
    pg.stop();
    fs.rmSync(tmp, { recursive: true, force: true });
  };
  try {
    s3 = await startLocalS3({ port: await freePort(), dir: path.join(tmp, "s3") });
    const env = { ...s3.env, DATABASE_URL: pg.url, BETTER_AUTH_SECRET: secret, ...opts.extraEnv };
    const count = opts.count ?? 2;
    for (let i = 0; i < count; i++) {
      const name = String.fromCharCode(65 + i);
      const app = await startApp(name, env, {
        port: opts.ports?.[i],
        dataDir: path.join(tmp, `data-${name}`),
        echo: opts.echo,
      });
      apps.push(app);
      if (!opts.together) await waitHealthy(app);
    }
    if (opts.together) await Promise.all(apps.map((a) => waitHealthy(a)));
    return { pg, s3, apps, secret, tmp, stop };
  } catch (err) {
    await stop();
    throw err;
  }
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  const base = Number(process.env.PORT ?? 3000);
  console.log("Starting a throwaway PostgreSQL server, the local S3 fake and two Tanklore processes…");
  await ensureBuild();
  let cluster: Cluster;
  try {
    cluster = await startCluster({ ports: [base, base + 1], echo: true });
  } catch (err) {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  }
  console.log(`
Tanklore cluster is running — two app processes sharing one database and one bucket:
  process A   ${cluster.apps[0]!.url}
  process B   ${cluster.apps[1]!.url}
  PostgreSQL  ${cluster.pg.url}   (data in ${cluster.pg.dir})
  S3 fake     ${cluster.s3.endpoint}  bucket ${cluster.s3.env.S3_BUCKET}
The database starts empty: for the invented demo club, run  DATABASE_URL=${cluster.pg.url} npm run db:seed
Put a reverse proxy in front of both ports to serve them as one site (docs/operations.md).
Everything here is temporary: Ctrl+C stops it all and deletes the data.
`);
  let stopping = false;
  const shutdown = () => {
    if (stopping) return;
    stopping = true;
    console.log("\nStopping the cluster…");
    void cluster.stop().finally(() => process.exit(0));
  };
  process.on("SIGINT", shutdown);
  process.on("SIGTERM", shutdown);
  for (const a of cluster.apps)
    a.child.once(
      "exit",
      (code) => !stopping && console.error(`Process ${a.name} exited (${code}); Ctrl+C stops the rest.`),
    );
}
