import crypto from "node:crypto";
import fs from "node:fs";
import http from "node:http";
import net from "node:net";
import path from "node:path";
import { PGlite } from "@electric-sql/pglite";
import { PGLiteSocketHandler } from "@electric-sql/pglite-socket";
import { dataDir } from "@/features/shared/env";
import { ExclusiveQueue } from "./embedded-queue";
import { acquireLock, releaseLock } from "./lock";
import { pgliteOptions } from "./pglite-options";

// The embedded database's own process (started by db/serve.ts for `npm start` and `npm run demo`): it owns
// DATA_DIR/pgdata and its lock, and serves PostgreSQL's wire protocol to the app, which connects with the same `pg`
// driver as on a PostgreSQL server. A long statement then occupies this process, never the app's event loop.

/** Connections accepted at once: the app's pool plus room for an operator's script (npm run db:compact). */
const EMBEDDED_MAX_CONNECTIONS = 8;
/** CHECKPOINT this often: single-user PostgreSQL has no checkpointer, so without it the WAL only grows. */
const CHECKPOINT_EVERY_MS = Number(process.env.TANKLORE_CHECKPOINT_MS) || 60_000;

const dir = path.join(dataDir(), "pgdata");
fs.mkdirSync(dir, { recursive: true });
const lock = acquireLock(dir);
const db = await PGlite.create(dir, pgliteOptions());
const queue = new ExclusiveQueue(db);

// A Unix socket beside the data directory (only this machine's users with access to DATA_DIR reach it); a
// loopback port when the path is too long for a socket address.
const socketDir = dataDir();
const socketPath = path.join(socketDir, ".s.PGSQL.5432");
const useSocket = socketPath.length < 100;
const handlers = new Set<PGLiteSocketHandler>();
const server = net.createServer((socket) => {
  if (handlers.size >= EMBEDDED_MAX_CONNECTIONS) {
    socket.end();
    return;
  }
  // Our queue in place of the package's own (see ExclusiveQueue); the handler calls the same three methods.
  const handler = new PGLiteSocketHandler({ queryQueue: queue as never, closeOnDetach: true });
  handlers.add(handler);
  const forget = () => handlers.delete(handler);
  handler.addEventListener("close", forget);
  handler.addEventListener("error", forget);
  handler.attach(socket).catch(() => {
    forget();
    socket.destroy();
  });
});
server.maxConnections = EMBEDDED_MAX_CONNECTIONS;
if (useSocket) fs.rmSync(socketPath, { force: true }); // left by a crash; we hold the lock, so it is ours
await new Promise<void>((resolve, reject) => {
  server.once("error", reject);
  if (useSocket) server.listen(socketPath, resolve);
  else server.listen(0, "127.0.0.1", resolve);
});
const url = useSocket
  ? `postgresql://postgres@localhost/postgres?host=${encodeURIComponent(socketDir)}`
  : `postgresql://postgres@127.0.0.1:${(server.address() as net.AddressInfo).port}/postgres`;

// Requests only the process holding PGlite can serve, authenticated by a token only our parent and the app know.
const token = crypto.randomBytes(24).toString("hex");
const control = http.createServer((req, res) => {
  const answer = (status: number, body: object) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(body));
  };
  if (req.method !== "POST" || req.url !== `/${token}/dump`) return answer(404, { error: "not found" });
  let body = "";
  req.on("data", (d) => (body += d));
  req.on("end", () => {
    void (async () => {
      try {
        const { file } = JSON.parse(body) as { file: string };
        const target = path.resolve(file);
        if (!target.startsWith(dataDir() + path.sep)) return answer(400, { error: "the dump goes inside DATA_DIR" });
        // Runs between two protocol messages: a caller holding a transaction open (a backup's snapshot) keeps
        // every other connection waiting meanwhile, so the dump sees no half-made change.
        const tarball = await db.dumpDataDir("none");
        await fs.promises.writeFile(target, Buffer.from(await tarball.arrayBuffer()));
        answer(200, { bytes: tarball.size });
      } catch (err) {
        answer(500, { error: err instanceof Error ? err.message : String(err) });
      }
    })();
  });
});
await new Promise<void>((resolve) => control.listen(0, "127.0.0.1", resolve));
const controlUrl = `http://127.0.0.1:${(control.address() as net.AddressInfo).port}/${token}`;

const checkpoints = setInterval(() => {
  queue
    .exclusive(() => db.exec("CHECKPOINT"))
    .catch((err) => console.error("Embedded database: checkpoint failed:", err));
}, CHECKPOINT_EVERY_MS);

let stopping = false;
async function stop(code: number): Promise<void> {
  if (stopping) return;
  stopping = true;
  clearInterval(checkpoints);
  control.close();
  server.close();
  for (const h of handlers) await h.detach(true).catch(() => {});
  try {
    await db.close(); // a clean shutdown checkpoints
  } finally {
    if (useSocket) fs.rmSync(socketPath, { force: true });
    fs.rmSync(`${dir}.address`, { force: true });
    releaseLock(lock);
    process.exit(code);
  }
}
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => void stop(0));
// The parent (db/serve.ts) went away, even by kill -9: stop rather than hold the data directory forever.
process.on("disconnect", () => void stop(0));

// Where an operator's script (npm run db:compact) finds the running database; removed on a clean stop.
const addressFile = `${dir}.address`;
fs.writeFileSync(addressFile, url);

const ready = { url, control: controlUrl };
if (process.send) process.send({ tankloreDatabaseReady: ready });
else console.log(`TANKLORE_DATABASE_READY ${JSON.stringify(ready)}`);
