import "server-only";
import { randomBytes } from "node:crypto";
import { sql } from "drizzle-orm";
import { cacheLife, cacheTag } from "next/cache";
import pg from "pg";
import { getDb, getDbKind } from "@/db/client";
import { getEnv } from "@/features/shared/env";

/**
 * Evidence caching (docs/architecture.md, "Evidence caching"). The public evidence reads are cached by Next.js
 * (`'use cache'`) under a key that includes a version, read once per request:
 * - the evidence epoch, this process's count of recomputes seen: bumped here right after a recompute commits, and
 *   on PostgreSQL also by a NOTIFY that every recompute sends inside its own transaction (delivered to every
 *   process's listener when it commits, never when it rolls back);
 * - the catalogue stamp, the newest row of the append-only catalogue- and settings-change log (one indexed query),
 *   so a renamed or added group, agent or condition shows at once in every process.
 * While a process's listener is not connected (starting, or the server went away) the epoch is replaced by the
 * current second: entries then live at most a second, the bound the cluster promises.
 */

export const EVIDENCE_CHANNEL = "tanklore_evidence";

interface State {
  /** Random per process: a cache shared by processes (a custom handler) never mixes two processes' epochs. */
  boot: string;
  epoch: number;
  /** The PostgreSQL listener is connected and LISTENing. */
  listening: boolean;
  client?: pg.Client;
  retryMs: number;
  stopped: boolean;
}

const store = globalThis as unknown as { __tankloreEvidenceCache?: State };
const state = (): State =>
  (store.__tankloreEvidenceCache ??= {
    boot: randomBytes(4).toString("hex"),
    epoch: 0,
    listening: false,
    retryMs: 500,
    stopped: true,
  });

/**
 * Call after a recompute has committed in this process: every cached evidence read made before it is stale. (The
 * name predates the framework cache; the worker and compute call it.)
 */
export function invalidateSummaryCache(): void {
  state().epoch += 1;
}

/** A statement runner: the database or an open transaction. */
type Executor = { execute: (query: ReturnType<typeof sql>) => Promise<unknown> };

/**
 * Inside the transaction that stores a pair's figures: tells every process on the same PostgreSQL server, once the
 * transaction commits, that its cached evidence is stale. PGlite accepts it too (one process, nobody listens).
 */
export async function announceEvidenceChange(tx: Executor, groupSlug: string, agentSlug: string): Promise<void> {
  await tx.execute(sql`select pg_notify(${EVIDENCE_CHANNEL}, ${`${groupSlug}|${agentSlug}`})`);
}

/** The version this request's cached evidence reads are keyed by: one cheap query (see the note at the top). */
export async function evidenceCacheVersion(): Promise<string> {
  const s = state();
  const db = await getDb();
  const { rows } = (await db.execute(sql`select coalesce(max(id), 0)::int as c from catalogue_changes`)) as unknown as {
    rows: { c: number }[];
  };
  const shared = (await getDbKind()) === "postgres";
  const epoch = shared && !s.listening ? `s${Math.floor(Date.now() / 1000)}` : `e${s.epoch}`;
  return `${s.boot}.${epoch}.c${rows[0]?.c ?? 0}`;
}

/**
 * Tags a cached evidence read: "evidence", plus one tag per agent and per group it shows, so `revalidateTag` in a
 * route handler or server action can drop exactly those. Outside Next.js (Vitest, scripts) `'use cache'` is an
 * inert string and there is nothing to tag.
 */
export function tagEvidence(tags: { agent?: string; group?: string }): void {
  if (!process.env.__NEXT_USE_CACHE) return;
  cacheTag(
    "evidence",
    ...(tags.agent ? [`evidence:agent:${tags.agent}`] : []),
    ...(tags.group ? [`evidence:group:${tags.group}`] : []),
  );
  // The version in the key is what keeps entries current; this only bounds how long an unused one is kept.
  cacheLife({ stale: 0, revalidate: 3600, expire: 86_400 });
}

/** The tags of a pair, for `revalidateTag` where a request context exists. */
export const evidenceTags = (groupSlug: string, agentSlug: string) => [
  `evidence:group:${groupSlug}`,
  `evidence:agent:${agentSlug}`,
];

function scheduleReconnect(s: State): void {
  if (s.stopped) return;
  const wait = s.retryMs;
  s.retryMs = Math.min(30_000, s.retryMs * 2);
  setTimeout(() => void connectListener(s), wait).unref();
}

async function connectListener(s: State): Promise<void> {
  const url = getEnv().DATABASE_URL;
  if (!url || s.stopped || s.client) return;
  const client = new pg.Client({ connectionString: url, application_name: "tanklore-evidence-listener" });
  s.client = client;
  const down = (err?: unknown) => {
    if (s.client !== client) return;
    s.client = undefined;
    s.listening = false;
    client.removeAllListeners();
    client.on("error", () => undefined);
    void client.end().catch(() => undefined);
    if (err && !s.stopped)
      console.error(
        "The evidence cache listener lost its connection; cached evidence lives at most a second until it is back:",
        err instanceof Error ? err.message : err,
      );
    scheduleReconnect(s);
  };
  client.on("notification", () => {
    s.epoch += 1;
  });
  client.on("error", down);
  client.on("end", () => down());
  try {
    await client.connect();
    await client.query(`listen ${EVIDENCE_CHANNEL}`);
    // Whatever committed while nobody listened: start from a fresh epoch.
    s.epoch += 1;
    s.listening = true;
    s.retryMs = 500;
  } catch (err) {
    down(err);
  }
}

/**
 * Starts this process's listener for other processes' recomputes (PostgreSQL only; with PGlite one process owns
 * the data). Until it is connected, cached evidence lives at most a second.
 */
export function startEvidenceCacheListener(): void {
  const s = state();
  if (!getEnv().DATABASE_URL || !s.stopped) return;
  s.stopped = false;
  void connectListener(s);
}

export async function stopEvidenceCacheListener(): Promise<void> {
  const s = state();
  s.stopped = true;
  const client = s.client;
  s.client = undefined;
  s.listening = false;
  if (client) {
    client.removeAllListeners();
    client.on("error", () => undefined);
    await client.end().catch(() => undefined);
  }
}

/** Whether the listener is connected (tests, health). */
export function evidenceCacheListening(): boolean {
  return state().listening;
}
