import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { freePort } from "./free-port";

/** Whether PostgreSQL server binaries are on this machine. */
export function hasPostgresServer(): boolean {
  return spawnSync("initdb", ["--version"]).status === 0 && spawnSync("pg_ctl", ["--version"]).status === 0;
}

/**
 * A throwaway PostgreSQL server in a temp directory on a free loopback port. initdb and postgres
 * refuse to run as root, so as root they run as the `postgres` user on a directory it owns.
 */
export async function startPostgres(): Promise<{ url: string; stop: () => void }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "tanklore-pg-"));
  const asRoot = process.getuid?.() === 0;
  if (asRoot) execFileSync("chown", ["postgres:postgres", dir]);
  const run = (cmd: string, args: string[]) =>
    asRoot
      ? execFileSync("runuser", ["-u", "postgres", "--", cmd, ...args], { stdio: "pipe" })
      : execFileSync(cmd, args, { stdio: "pipe" });
  const data = path.join(dir, "data");
  run("initdb", ["-D", data, "-A", "trust", "-U", "tanklore", "--no-sync"]);
  const port = await freePort();
  run("pg_ctl", ["-D", data, "-w", "-l", path.join(dir, "log"), "-o", `-p ${port} -k ${dir} -h 127.0.0.1 -F`, "start"]);
  return {
    url: `postgres://tanklore@127.0.0.1:${port}/postgres`,
    stop: () => {
      try {
        run("pg_ctl", ["-D", data, "-m", "immediate", "stop"]);
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
    },
  };
}
