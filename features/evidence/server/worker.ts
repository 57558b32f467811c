import { and, eq, inArray, sql } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { getClubSettings } from "@/features/catalogue/server";
import {
  enqueueEvidenceRecompute,
  enqueueEvidenceRecomputeWhere,
  setEvidenceWorkerWake,
  type EvidencePair,
} from "@/features/shared/server/evidence-outbox";
import { failuresWaiting, recordFailure } from "@/features/shared/server/jobs";
import { invalidateSummaryCache, startEvidenceCacheListener, stopEvidenceCacheListener } from "./cache";
import { lockPair, replacePairFigures } from "./compute";

const { evidenceOutbox } = schema;

export interface DrainResult {
  /** Pairs recomputed and stored. */
  recomputed: number;
  /** Pairs whose recompute failed: their outbox rows stay for the next attempt. */
  failed: number;
  /** Summary rows stored (all conditions and each condition of every recomputed pair). */
  rows: number;
}

interface WorkerState {
  /** The drain in progress or last finished: drains in one process run one after another. */
  tail: Promise<unknown>;
  /** A wake-up drain is already waiting to start; it will see whatever was enqueued meanwhile. */
  queued: boolean;
  timer?: ReturnType<typeof setInterval>;
}

const store = globalThis as unknown as { __tankloreEvidenceWorker?: WorkerState };
const state = (): WorkerState => (store.__tankloreEvidenceWorker ??= { tail: Promise.resolve(), queued: false });
const keyOf = (g: string, a: string) => `${g}\u0000${a}`;
/**
 * A failed pair's record in the jobs table (features/shared/server/jobs.ts): its error for the admins and when
 * to try again (growing delays, shared by every process, so a broken pair neither floods the log nor waits forever).
 * The outbox rows themselves stay until a recompute succeeds.
 */
const FAILURE_KIND = "evidence-recompute";
const failureKey = (g: string, a: string) => `${g}/${a}`;

/**
 * One pair, one transaction: take the pair's lock, see which outbox rows are there, recompute from the
 * reports, replace the stored figures and delete exactly those rows. Under READ COMMITTED each statement
 * reads a fresh snapshot, so every change whose outbox row was read is visible to the recompute that
 * follows; a change committing later leaves its own row behind and is recomputed next time. A recompute
 * that fails rolls back whole: the old figures and the outbox rows stay.
 */
async function drainPair(db: Db, groupSlug: string, agentSlug: string): Promise<number | null> {
  return db.transaction(async (tx) => {
    await lockPair(tx, groupSlug, agentSlug);
    const ids = (
      await tx
        .select({ id: evidenceOutbox.id })
        .from(evidenceOutbox)
        .where(and(eq(evidenceOutbox.groupSlug, groupSlug), eq(evidenceOutbox.agentSlug, agentSlug)))
    ).map((r) => r.id);
    // Another worker handled the pair while this one waited for the lock.
    if (ids.length === 0) return null;
    const rows = await replacePairFigures(tx, groupSlug, agentSlug, await getClubSettings(tx));
    await tx.delete(evidenceOutbox).where(inArray(evidenceOutbox.id, ids));
    return rows;
  });
}

async function drainOnce(db: Db, force: boolean): Promise<DrainResult> {
  const result: DrainResult = { recomputed: 0, failed: 0, rows: 0 };
  // Pairs that failed in this drain: not tried again until the next one.
  const tried = new Set<string>();
  // Repeat until a round finds nothing new: changes committed during a round are picked up by the next.
  for (;;) {
    const pending = (await db.execute(
      sql`select group_slug, agent_slug from evidence_outbox group by group_slug, agent_slug order by min(id)`,
    )) as unknown as { rows: { group_slug: string; agent_slug: string }[] };
    // Pairs whose last recompute failed wait out their delay, whichever process tried them (recorded in jobs).
    const waiting = force ? new Set<string>() : await failuresWaiting(FAILURE_KIND);
    const todo = pending.rows.filter((p) => {
      const k = keyOf(p.group_slug, p.agent_slug);
      return !tried.has(k) && !waiting.has(failureKey(p.group_slug, p.agent_slug));
    });
    if (todo.length === 0) break;
    for (const p of todo) {
      const k = keyOf(p.group_slug, p.agent_slug);
      try {
        const rows = await drainPair(db, p.group_slug, p.agent_slug);
        // After the commit: this process's cached responses may now be stale.
        invalidateSummaryCache();
        // Clears a failure recorded by any process (a no-op delete when there was none).
        await recordFailure(FAILURE_KIND, failureKey(p.group_slug, p.agent_slug), null).catch(() => undefined);
        if (rows !== null) {
          result.recomputed += 1;
          result.rows += rows;
        }
      } catch (err) {
        tried.add(k);
        result.failed += 1;
        await recordFailure(FAILURE_KIND, failureKey(p.group_slug, p.agent_slug), err, new Date(), {
          groupSlug: p.group_slug,
          agentSlug: p.agent_slug,
        }).catch((e) => console.error("Could not record the failed recompute:", e));
        console.error(
          `Recomputing the evidence of ${p.group_slug} × ${p.agent_slug} failed; the change stands and the recompute will be retried:`,
          err,
        );
      }
    }
  }
  return result;
}

function enqueueDrain(force: boolean, db?: Db): Promise<DrainResult> {
  const s = state();
  const run = s.tail.catch(() => undefined).then(async () => drainOnce(db ?? (await getDb()), force));
  s.tail = run;
  return run;
}

/**
 * Recomputes every pair waiting in the outbox now, retrying failed pairs at once; resolves when done.
 * Tests, scripts and `npm run demo` call it; the running app relies on the worker instead.
 */
export function drainEvidenceOutbox(opts: { db?: Db } = {}): Promise<DrainResult> {
  return enqueueDrain(true, opts.db);
}

/** Wakes the worker: one drain soon, however many wake-ups arrive before it starts. */
function wake(): void {
  const s = state();
  if (s.queued) return;
  s.queued = true;
  s.tail = s.tail
    .catch(() => undefined)
    .then(async () => {
      s.queued = false;
      return drainOnce(await getDb(), false);
    })
    .catch((err) => console.error("The evidence worker could not read its outbox; it will try again:", err));
}

/**
 * Starts this process's evidence worker: woken right after a change commits here, and polling every
 * `everyMs` for changes committed by another process or left over from a crash.
 */
export function startEvidenceWorker(everyMs = 1_000): void {
  const s = state();
  if (s.timer) return;
  // Recomputes committed by other processes on the same PostgreSQL server invalidate this one's cached evidence.
  startEvidenceCacheListener();
  setEvidenceWorkerWake(wake);
  s.timer = setInterval(wake, everyMs);
  s.timer.unref();
  wake();
}

export function stopEvidenceWorker(): void {
  const s = state();
  if (s.timer) clearInterval(s.timer);
  s.timer = undefined;
  setEvidenceWorkerWake(undefined);
  void stopEvidenceCacheListener();
}

/**
 * Enqueues the pairs in their own transaction and drains the outbox. For a caller that changed reports
 * outside an enqueueing transaction; a change should rather call enqueueEvidenceRecompute in its own.
 */
export async function recomputeAfterChange(pairs: EvidencePair[]): Promise<DrainResult> {
  const db = await getDb();
  await db.transaction(async (tx) => {
    await enqueueEvidenceRecompute(tx, pairs);
  });
  return drainEvidenceOutbox({ db });
}

/** Every pair with accepted reports or stored figures, recomputed now (seeding, benchmarks); returns rows stored. */
export async function recomputeAll(db?: Db): Promise<number> {
  const d = db ?? (await getDb());
  await enqueueEvidenceRecomputeWhere(d);
  return (await drainEvidenceOutbox({ db: d })).rows;
}
