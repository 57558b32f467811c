import fs from "node:fs";
import path from "node:path";

/**
 * PGlite takes no lock of its own and two processes on one data directory corrupt it, so we hold
 * a pid lock file beside the directory. A lock whose process is gone (kill -9) is stale and taken over.
 */
export class DataDirLockedError extends Error {
  constructor(
    readonly lockFile: string,
    readonly holderPid: number,
    readonly holderCommand: string,
  ) {
    super(
      `The data directory is in use by another Tanklore process (pid ${holderPid}: ${holderCommand}). ` +
        `Stop that process first, or give this one its own DATA_DIR. Lock file: ${lockFile}`,
    );
    this.name = "DataDirLockedError";
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === "EPERM";
  }
}

const held = new Set<string>();

export function acquireLock(dir: string): string {
  const lockFile = path.join(path.dirname(dir), `${path.basename(dir)}.lock`);
  fs.mkdirSync(path.dirname(lockFile), { recursive: true });
  const mine = JSON.stringify({ pid: process.pid, command: process.argv.slice(1).join(" ").slice(0, 200) });
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      fs.writeFileSync(lockFile, mine, { flag: "wx" });
      held.add(lockFile);
      return lockFile;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
    }
    let holder: { pid: number; command: string } = { pid: 0, command: "unknown" };
    try {
      holder = JSON.parse(fs.readFileSync(lockFile, "utf8"));
    } catch {
      // An unreadable or half-written lock file: treat as stale below.
    }
    if (holder.pid === process.pid) return lockFile;
    if (holder.pid > 0 && alive(holder.pid)) throw new DataDirLockedError(lockFile, holder.pid, holder.command);
    fs.rmSync(lockFile, { force: true });
  }
  throw new Error(`Could not take the lock ${lockFile}; another process keeps taking it.`);
}

export function releaseLock(lockFile: string): void {
  if (!held.has(lockFile)) return;
  try {
    const holder = JSON.parse(fs.readFileSync(lockFile, "utf8"));
    if (holder.pid === process.pid) fs.rmSync(lockFile, { force: true });
  } catch {
    // Already gone.
  }
  held.delete(lockFile);
}

process.once("exit", () => {
  for (const f of held) releaseLock(f);
});
