import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { dataDir, getEnv } from "@/features/shared/env";
import { acquireLock, releaseLock } from "./lock";

const root = process.cwd();
// The app runs offline: Next.js sends no telemetry from a build or a server started here.
process.env.NEXT_TELEMETRY_DISABLED = "1";
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
const sources = [
  "app",
  "features",
  "db",
  "drizzle",
  "public",
  "fonts",
  "proxy.ts",
  "instrumentation.ts",
  "instrumentation-client.ts",
  "package-lock.json",
  "next.config.ts",
  "tailwind.config.ts",
  "postcss.config.mjs",
  "tsconfig.json",
];

function newestMtime(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let max = 0;
  for (const e of fs.readdirSync(p)) max = Math.max(max, newestMtime(path.join(p, e)));
  return max;
}

/** Reads `.env` from the working directory, if there is one; variables already set in the environment win. */
export function loadDotEnv(): void {
  const file = path.join(root, ".env");
  if (fs.existsSync(file)) process.loadEnvFile(file);
}

/** Refuses early, before building, when another process holds the data directory. */
export function checkDataDirFree(): void {
  if (getEnv().DATABASE_URL) return;
  const lock = acquireLock(path.join(dataDir(), "pgdata"));
  releaseLock(lock);
}

/** Builds the app when there is no build yet or a source file is newer than it. */
export function buildIfNeeded(): void {
  const buildId = path.join(root, ".next", "BUILD_ID");
  const built = fs.existsSync(buildId) ? fs.statSync(buildId).mtimeMs : 0;
  const changed = Math.max(...sources.map((s) => newestMtime(path.join(root, s))));
  if (built && built >= changed) return;
  console.log(
    built ? "Sources changed since the last build: building again…" : "Building the app (first run; about a minute)…",
  );
  const r = spawnSync(process.execPath, [nextBin, "build"], {
    stdio: "inherit",
    env: { ...process.env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
  });
  if (r.status !== 0) {
    console.error("The build failed; see the messages above.");
    process.exit(r.status ?? 1);
  }
}

/** The database the app will use, ready and migrated; what the app's process needs to reach it; how to stop it. */
export interface PreparedDatabase {
  appEnv: Record<string, string>;
  stop: () => Promise<void>;
}

/**
 * With no DATABASE_URL: starts the embedded database in its own process (db/database-process.ts), which owns
 * DATA_DIR/pgdata. Either way, applies pending migrations under an advisory lock before any app serves, and points
 * this process's getDb() at the same database (so `npm run demo` seeds through it).
 */
export async function prepareDatabase(): Promise<PreparedDatabase> {
  let appEnv: Record<string, string> = {};
  let stop = async () => {};
  if (!getEnv().DATABASE_URL) {
    const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "db", "database-process.ts")], {
      stdio: ["ignore", "inherit", "inherit", "ipc"],
      env: { ...process.env, DATA_DIR: dataDir() },
      // Its own process group: Ctrl+C reaches the app first, and the database stops after the app has.
      detached: true,
    });
    const ready = await new Promise<{ url: string; control: string }>((resolve, reject) => {
      child.on("message", (m: { tankloreDatabaseReady?: { url: string; control: string } }) => {
        if (m?.tankloreDatabaseReady) resolve(m.tankloreDatabaseReady);
      });
      child.once("exit", (code) =>
        reject(
          new Error(
            `The embedded database process stopped (exit code ${code}) before it was ready; see the messages above.`,
          ),
        ),
      );
    });
    let stopping = false;
    child.on("exit", (code, signal) => {
      if (stopping) return;
      console.error(
        `The embedded database process stopped unexpectedly (${signal ?? `exit code ${code}`}); stopping the app.`,
      );
      process.emit("SIGTERM");
    });
    stop = async () => {
      if (stopping || child.exitCode !== null || child.signalCode !== null) return;
      stopping = true;
      const exited = new Promise((r) => child.once("exit", r));
      child.kill("SIGTERM");
      const timer = setTimeout(() => child.kill("SIGKILL"), 30_000);
      await exited;
      clearTimeout(timer);
    };
    appEnv = { TANKLORE_EMBEDDED_DB_URL: ready.url, TANKLORE_EMBEDDED_DB_CONTROL: ready.control };
    Object.assign(process.env, appEnv);
  }
  // Migrations run in a short-lived child (db/migrate.ts: opening the database applies them, under the advisory
  // lock), so this launcher, which stays alive to supervise, never loads the ORM and its memory stays small.
  const migrated = await new Promise<number | null>((resolve) => {
    const child = spawn(
      process.execPath,
      ["--conditions=react-server", "--import", "tsx", path.join(root, "db", "migrate.ts")],
      { stdio: ["ignore", "inherit", "inherit"], env: { ...process.env, ...appEnv } },
    );
    child.on("exit", (code) => resolve(code));
    child.on("error", () => resolve(null));
  });
  if (migrated !== 0) {
    await stop();
    throw new Error("The database could not be migrated; see the messages above.");
  }
  return { appEnv: { ...appEnv, TANKLORE_MIGRATIONS: "applied" }, stop };
}

/**
 * Starts the app's server (db/http-server.ts) on the prepared database, waits for /api/health, then calls onReady.
 * Ctrl+C or SIGTERM stops the app first, then the database.
 */
export async function serve(database: PreparedDatabase, onReady: (url: string) => void): Promise<void> {
  // This process is done with the database (`npm run demo` seeded through it); the app opens its own connections.
  // Only where it was opened: loading the client (ORM, drivers) would cost the supervising launcher ~100 MB.
  if ((globalThis as { __tankloreDb?: unknown }).__tankloreDb) await (await import("./client")).closeDb();
  const env = getEnv();
  const port = env.PORT;
  // TANKLORE_APP_NODE_ARGS: extra Node options for the app's process only (e.g. --cpu-prof to profile it;
  // NODE_OPTIONS refuses those and would reach the database process too).
  const extra = (process.env.TANKLORE_APP_NODE_ARGS ?? "").split(/\s+/).filter(Boolean);
  // A heap budget for the app: without one V8 lets the heap grow lazily under load (ten connections rendering pages
  // left the app at 857 MB RSS, kept through the next hour's export). 512 MB is several times the live data of the
  // largest request (a 20,000-row import); TANKLORE_APP_NODE_ARGS with its own --max-old-space-size replaces it.
  if (!extra.some((a) => a.startsWith("--max-old-space-size"))) extra.unshift("--max-old-space-size=512");
  const child = spawn(process.execPath, [...extra, "--import", "tsx", path.join(root, "db", "http-server.ts")], {
    stdio: ["ignore", "inherit", "inherit"],
    env: {
      ...process.env,
      ...database.appEnv,
      NODE_ENV: "production",
      DATA_DIR: dataDir(),
      NEXT_TELEMETRY_DISABLED: "1",
    },
  });
  let signalled = false;
  for (const sig of ["SIGINT", "SIGTERM"] as const) {
    process.on(sig, () => {
      signalled = true;
      if (child.exitCode === null && child.signalCode === null) child.kill(sig);
      else void database.stop().finally(() => process.exit(1));
    });
  }
  child.on("exit", (code, signal) => {
    void database.stop().finally(() => process.exit(code ?? (signal && !signalled ? 1 : 0)));
  });
  const url = `http://localhost:${port}`;
  for (let i = 0; i < 240; i++) {
    await new Promise((r) => setTimeout(r, 500));
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) {
        onReady(url);
        return;
      }
      if (res.status >= 500) {
        console.error(`The app answered ${res.status} on /api/health: ${await res.text()}`);
      }
    } catch {
      // Not listening yet.
    }
  }
  console.error("The app did not become ready within two minutes.");
  child.kill("SIGTERM");
}
