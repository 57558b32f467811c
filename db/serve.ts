import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { dataDir, getEnv } from "@/features/shared/env";
import { acquireLock, releaseLock } from "./lock";

const root = process.cwd();
const nextBin = path.join(root, "node_modules", "next", "dist", "bin", "next");
const sources = ["app", "features", "db", "drizzle", "public", "fonts", "package-lock.json", "next.config.ts", "tailwind.config.ts", "postcss.config.mjs", "tsconfig.json"];

function newestMtime(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let max = 0;
  for (const e of fs.readdirSync(p)) max = Math.max(max, newestMtime(path.join(p, e)));
  return max;
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
  console.log(built ? "Sources changed since the last build: building again…" : "Building the app (first run; about a minute)…");
  const r = spawnSync(process.execPath, [nextBin, "build"], { stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
  if (r.status !== 0) {
    console.error("The build failed; see the messages above.");
    process.exit(r.status ?? 1);
  }
}

/** Starts the app's server (db/http-server.ts), waits for /api/health, then calls onReady. Signals are passed on. */
export async function serve(onReady: (url: string) => void): Promise<void> {
  const env = getEnv();
  const port = env.PORT;
  const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "db", "http-server.ts")], {
    stdio: ["ignore", "inherit", "inherit"],
    env: { ...process.env, NODE_ENV: "production", DATA_DIR: dataDir() },
  });
  for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => child.kill(sig));
  child.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
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
  process.exit(1);
}
