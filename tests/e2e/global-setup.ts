import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { freePort } from "../support/free-port";

export default async function setup(project: TestProject) {
  const root = process.cwd();
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-e2e-"));
  const port = await freePort();
  const env = {
    ...process.env,
    NODE_ENV: "production" as const,
    DATA_DIR: dataDir,
    PORT: String(port),
    BETTER_AUTH_URL: `http://localhost:${port}`,
    DEMO_PASSWORD: "e2e-demo-password",
    // The suite signs in many times a minute from one address; the limiter's 429 is covered by
    // tests/integration/sign-in-rate-limit.test.ts.
    RATE_LIMIT: "off",
  };
  // Vitest sets TEST=true, which better-auth takes for a test run and then skips its origin (CSRF) check:
  // the server under test must behave as in production.
  delete (env as NodeJS.ProcessEnv).TEST;
  const tsx = ["--import", "tsx"];
  const build = spawnSync(
    process.execPath,
    [...tsx, "-e", "const m = await import('./db/serve.ts'); m.buildIfNeeded();"],
    { cwd: root, env, stdio: "inherit" },
  );
  if (build.status !== 0) throw new Error("next build failed");
  // Server modules import "server-only", which resolves to an empty module under this condition.
  const seed = spawnSync(process.execPath, ["--conditions=react-server", ...tsx, "db/seed.ts"], {
    cwd: root,
    env,
    stdio: "inherit",
  });
  if (seed.status !== 0) throw new Error("seeding the demo club failed");

  // `npm start` itself: the embedded database in its own process, migrations, then Next.js behind
  // db/http-server.ts (which stamps the socket address).
  const server: ChildProcess = spawn(process.execPath, ["--conditions=react-server", ...tsx, "db/start.ts"], {
    cwd: root,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  let log = "";
  server.stdout?.on("data", (d) => (log += d));
  server.stderr?.on("data", (d) => (log += d));
  const base = `http://localhost:${port}`;
  let ready = false;
  for (let i = 0; i < 120 && !ready; i++) {
    await new Promise((r) => setTimeout(r, 500));
    ready = await fetch(`${base}/api/health`).then(
      (r) => r.ok,
      () => false,
    );
  }
  if (!ready) {
    server.kill("SIGKILL");
    throw new Error(`the app did not start:\n${log}`);
  }
  project.provide("baseUrl", base);
  project.provide("demoPassword", env.DEMO_PASSWORD);
  project.provide("dataDir", dataDir);
  return async () => {
    const exited = new Promise((r) => server.once("exit", r));
    server.kill("SIGTERM"); // stops the app, then the database process
    await Promise.race([exited, new Promise((r) => setTimeout(r, 15_000))]);
    if (server.exitCode === null) server.kill("SIGKILL");
    if (process.env.E2E_KEEP_LOG) console.log(log);
    fs.rmSync(dataDir, { recursive: true, force: true });
  };
}

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    demoPassword: string;
    dataDir: string;
  }
}
