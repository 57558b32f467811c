import "server-only";
import { AsyncLocalStorage } from "node:async_hooks";
import crypto from "node:crypto";
import os from "node:os";
import { and, desc, eq, isNotNull, or, sql, type SQL } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { AppError } from "@/features/shared/errors";
import { authorize, canReadJobs, type Caller } from "@/features/shared/policies";

/**
 * Background work claimed in the database, the same way on PGlite and on a PostgreSQL server: a due row is
 * claimed with `UPDATE … WHERE id IN (SELECT … FOR UPDATE SKIP LOCKED)`, so when several processes poll, each
 * row goes to exactly one of them and nobody waits on another's claim. A claim is a lease (lockedUntil): a
 * process that dies mid-job leaves a row the others take again when the lease runs out, so nothing queued is
 * lost to a restart. Failures are retried with growing delays and recorded on the row (GET /api/admin/jobs).
 *
 * Two shapes: one-off jobs (a notice mail) that end done or failed, and recurring rounds (reminders, digests,
 * the nightly-backup check), one row per kind that reschedules itself — whichever process claims the row runs
 * the round for everyone.
 *
 * Why not pg-boss: it needs a PostgreSQL server (it does not run on the embedded PGlite), and the one-process
 * shape must keep working with no server at all; SKIP LOCKED claims give both shapes one code path.
 */

const { jobs } = schema;

export interface JobContext {
  /** The time the run is for (tests pass their own clock). */
  now: Date;
  attempt: number;
}

export interface JobHandler {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- each job kind defines its own payload shape; the runner passes stored JSON through
  run(payload: any, ctx: JobContext): Promise<void>;
  maxAttempts?: number;
  /** Wait before retry number `attempt` (1-based); default 30 s doubling, at most an hour. */
  backoffMs?(attempt: number): number;
  /** How long a claim holds before others may take the job again (default five minutes). */
  leaseMs?: number;
  /** Recurring rounds: run every `everyMs`, on slot boundaries. */
  everyMs?: number;
  /** What stays of a finished one-off job's payload (mails drop their body, which may hold sign-in links). */
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- each job kind defines its own payload shape; the runner passes stored JSON through
  summarize?(payload: any): Record<string, unknown>;
}

interface Registry {
  handlers: Map<string, JobHandler>;
  timer?: ReturnType<typeof setInterval>;
  running?: Promise<number>;
  again?: boolean;
}

// On globalThis: Next.js bundles instrumentation (which starts the runner) apart from the route handlers.
const store = globalThis as unknown as { __tankloreJobs?: Registry };
const registry = (): Registry => (store.__tankloreJobs ??= { handlers: new Map() });

/** This process's name on the rows it claims. */
export const workerId = `${os.hostname()}:${process.pid}:${crypto.randomBytes(3).toString("hex")}`;

export function registerJob(kind: string, handler: JobHandler): void {
  registry().handlers.set(kind, handler);
}

const defaultBackoff = (attempt: number) => Math.min(3600_000, 30_000 * 2 ** Math.max(0, attempt - 1));

type Executor = Pick<Db, "insert" | "execute">;

/**
 * Queues a one-off job, in the caller's transaction when given one (so the job commits with the change that
 * asked for it). With a dedupeKey, a second enqueue of the same key does nothing; returns whether a row was added.
 */
export async function enqueueJob(
  kind: string,
  payload: Record<string, unknown> = {},
  opts: { tx?: Executor; runAt?: Date; dedupeKey?: string; maxAttempts?: number } = {},
): Promise<boolean> {
  const db = opts.tx ?? (await getDb());
  const now = new Date();
  const rows = await db
    .insert(jobs)
    .values({
      id: crypto.randomUUID(),
      kind,
      dedupeKey: opts.dedupeKey ?? null,
      payload,
      runAt: opts.runAt ?? now,
      maxAttempts: opts.maxAttempts ?? registry().handlers.get(kind)?.maxAttempts ?? 5,
    })
    .onConflictDoNothing()
    .returning({ id: jobs.id });
  return rows.length > 0;
}

/** The start of the next slot of `everyMs` after `now` (slots line up across processes). */
function nextSlot(now: Date, everyMs: number): Date {
  return new Date((Math.floor(now.getTime() / everyMs) + 1) * everyMs);
}

/** Makes sure each registered recurring round has its row (one per kind, whoever creates it first). */
async function ensureRounds(db: Db, now: Date): Promise<void> {
  for (const [kind, h] of registry().handlers) {
    if (!h.everyMs) continue;
    await db
      .insert(jobs)
      .values({
        id: crypto.randomUUID(),
        kind,
        dedupeKey: `round:${kind}`,
        payload: {},
        runAt: now,
        maxAttempts: h.maxAttempts ?? 5,
      })
      .onConflictDoNothing();
  }
}

interface ClaimedRow {
  id: string;
  kind: string;
  payload: unknown;
  attempts: number;
  max_attempts: number;
}

const rowsOf = <T>(r: unknown): T[] => (r as { rows: T[] }).rows;

/** Claims up to `limit` due jobs of the given kinds for this process. */
async function claim(db: Db, kinds: string[], now: Date, limit: number): Promise<ClaimedRow[]> {
  if (!kinds.length) return [];
  const kindList = sql.join(
    kinds.map((k) => sql`${k}`),
    sql`, `,
  );
  // Each kind's own lease: a silent backup is given an hour, a silent mail five minutes.
  const until = sql`case kind ${sql.join(
    kinds.map(
      (k) =>
        sql`when ${k} then ${new Date(now.getTime() + (registry().handlers.get(k)?.leaseMs ?? 5 * 60_000))}::timestamptz`,
    ),
    sql` `,
  )} end`;
  const r = await db.execute(sql`
    update jobs set status = 'running', attempts = attempts + 1, locked_by = ${workerId}, locked_until = ${until}, updated_at = ${now}
     where id in (
       select id from jobs
        where kind in (${kindList})
          and ((status = 'queued' and run_at <= ${now}) or (status = 'running' and locked_until < ${now}))
        order by run_at
        limit ${limit}
        for update skip locked)
    returning id, kind, payload, attempts, max_attempts`);
  return rowsOf<ClaimedRow>(r);
}

function describeError(err: unknown): string {
  const text = err instanceof Error ? `${err.name}: ${err.message}` : String(err);
  return text.slice(0, 2000);
}

async function finish(db: Db, row: ClaimedRow, h: JobHandler, now: Date, err: unknown | null): Promise<void> {
  const mine = and(eq(jobs.id, row.id), eq(jobs.lockedBy, workerId));
  const released = { lockedBy: null, lockedUntil: null, updatedAt: new Date() };
  if (err === null) {
    if (h.everyMs) {
      await db
        .update(jobs)
        .set({ ...released, status: "queued", attempts: 0, lastError: null, runAt: nextSlot(now, h.everyMs) })
        .where(mine);
    } else {
      const payload = h.summarize ? h.summarize(row.payload) : (row.payload as Record<string, unknown>);
      await db
        .update(jobs)
        .set({ ...released, status: "done", lastError: null, payload })
        .where(mine);
    }
    return;
  }
  const lastError = describeError(err);
  const retryAt = new Date(now.getTime() + (h.backoffMs ?? defaultBackoff)(row.attempts));
  // A round never gives up (it is the schedule itself); it keeps its error and count until a run succeeds.
  const gaveUp = !h.everyMs && row.attempts >= row.max_attempts;
  await db
    .update(jobs)
    .set({ ...released, status: gaveUp ? "failed" : "queued", lastError, runAt: gaveUp ? new Date(now) : retryAt })
    .where(mine);
}

/**
 * Claims and runs due jobs (all registered kinds, or just `kinds`) until none is left; returns how many ran.
 * Safe to call from any number of processes at once.
 */
export async function runDueJobs(opts: { kinds?: string[]; now?: Date; limit?: number } = {}): Promise<number> {
  const db = await getDb();
  const handlers = registry().handlers;
  const kinds = (opts.kinds ?? [...handlers.keys()]).filter((k) => handlers.has(k));
  let ran = 0;
  for (;;) {
    const now = opts.now ?? new Date();
    const claimed = await claim(db, kinds, now, opts.limit ?? 10);
    if (!claimed.length) return ran;
    for (const row of claimed) {
      const h = handlers.get(row.kind)!;
      let error: unknown | null = null;
      try {
        await insideJob.run(true, () => h.run(row.payload, { now, attempt: row.attempts }));
      } catch (err) {
        error = err ?? new Error("failed");
        console.error(`Background job ${row.kind} (${row.id}) failed on attempt ${row.attempts}:`, err);
      }
      await finish(db, row, h, now, error);
      ran += 1;
    }
    // A test clock runs each due job once per call; the real clock keeps going until the queue is empty.
    if (opts.now) return ran;
  }
}

/** Set while a job's handler runs: a handler that kicks the runner must not wait for the run it is part of. */
const insideJob = new AsyncLocalStorage<boolean>();

/**
 * Runs due jobs soon in this process (after a request queued one), however many ask before it starts. Called
 * from inside a job (a reminder round queueing mails), it only asks the running loop to go round again and
 * resolves at once: awaiting the loop from inside it would wait on itself and stall every job in the process.
 */
export function kickJobs(kinds?: string[]): Promise<number> {
  const r = registry();
  if (r.running) {
    r.again = true;
    return insideJob.getStore() ? Promise.resolve(0) : r.running;
  }
  const go = async (): Promise<number> => {
    let n = 0;
    let only = kinds;
    do {
      r.again = false;
      n += await runDueJobs({ kinds: only });
      // Another kick came during the run, perhaps for other kinds (a round queueing mails): all that is due.
      only = undefined;
    } while (r.again);
    return n;
  };
  r.running = go()
    .catch((err) => {
      console.error("The job runner could not read its queue; it will try again:", err);
      return 0;
    })
    .finally(() => {
      r.running = undefined;
    });
  return r.running;
}

/** Waits for this process's running kick, if any (tests). */
export async function settleJobs(): Promise<void> {
  while (registry().running) await registry().running;
}

/**
 * Starts this process's job runner: every `everyMs` it makes sure the rounds exist and claims what is due.
 * Every app process runs one; the claims decide who does what.
 */
export function startJobRunner(everyMs = 5_000): void {
  const r = registry();
  if (r.timer) return;
  const tick = async () => {
    try {
      const db = await getDb();
      await ensureRounds(db, new Date());
      if (Math.random() < 0.01) await pruneJobs(db, new Date());
    } catch (err) {
      console.error("The job runner could not reach the database; it will try again:", err);
      return;
    }
    await kickJobs();
  };
  r.timer = setInterval(() => void tick(), everyMs);
  r.timer.unref();
  void tick();
}

export function stopJobRunner(): void {
  const r = registry();
  if (r.timer) clearInterval(r.timer);
  r.timer = undefined;
}

const DAY = 24 * 3600_000;

/** Finished one-off jobs go after a week, failed ones after 30 days (long enough for an admin to notice). */
async function pruneJobs(db: Db, now: Date): Promise<void> {
  await db.execute(sql`
    delete from jobs
     where (status = 'done' and updated_at < ${new Date(now.getTime() - 7 * DAY)})
        or (status = 'failed' and updated_at < ${new Date(now.getTime() - 30 * DAY)})`);
}

/** Records (or clears, with error null) a failure of work queued elsewhere (the evidence outbox), for admins. */
export async function recordFailure(
  kind: string,
  key: string,
  error: unknown | null,
  now = new Date(),
  payload: Record<string, unknown> = {},
): Promise<void> {
  const db = await getDb();
  const dedupeKey = `${kind}:${key}`;
  if (error === null) {
    await db.delete(jobs).where(eq(jobs.dedupeKey, dedupeKey));
    return;
  }
  const lastError = describeError(error);
  await db
    .insert(jobs)
    .values({
      id: crypto.randomUUID(),
      kind,
      dedupeKey,
      payload,
      status: "queued",
      attempts: 1,
      lastError,
      runAt: new Date(now.getTime() + defaultBackoff(1)),
    })
    .onConflictDoUpdate({
      target: jobs.dedupeKey,
      set: {
        attempts: sql`${jobs.attempts} + 1`,
        lastError,
        updatedAt: now,
        runAt: sql`${now.toISOString()}::timestamptz + least(3600000, 30000 * power(2, ${jobs.attempts})) * interval '1 millisecond'`,
      },
    });
}

/** Keys of `kind` whose recorded failure says not to retry before its time. */
export async function failuresWaiting(kind: string, now = new Date()): Promise<Set<string>> {
  const db = await getDb();
  const rows = await db
    .select({ key: jobs.dedupeKey })
    .from(jobs)
    .where(and(eq(jobs.kind, kind), isNotNull(jobs.lastError), sql`${jobs.runAt} > ${now}`));
  return new Set(rows.map((r) => r.key!.slice(kind.length + 1)));
}

export interface JobView {
  id: string;
  kind: string;
  status: string;
  attempts: number;
  maxAttempts: number;
  runAt: string;
  lockedBy: string | null;
  lastError: string | null;
  updatedAt: string;
  summary: Record<string, unknown>;
}

/** GET /api/admin/jobs: what each kind of work is doing, and every job with an error (newest first). */
export async function listJobs({ actor }: Caller, opts: { limit?: number } = {}) {
  authorize(actor, canReadJobs, "see the background jobs");
  const db = await getDb();
  const counts = await db
    .select({ kind: jobs.kind, status: jobs.status, n: sql<number>`count(*)::int` })
    .from(jobs)
    .groupBy(jobs.kind, jobs.status)
    .orderBy(jobs.kind, jobs.status);
  const where: SQL = or(
    isNotNull(jobs.lastError),
    eq(jobs.status, "failed"),
    eq(jobs.status, "running"),
    sql`${jobs.dedupeKey} like 'round:%'`,
  )!;
  const rows = await db
    .select()
    .from(jobs)
    .where(where)
    .orderBy(desc(jobs.updatedAt))
    .limit(opts.limit ?? 100);
  const view = (j: typeof jobs.$inferSelect): JobView => {
    const p = (j.payload ?? {}) as Record<string, unknown>;
    // Only what says which job it was: a queued mail's body may carry a sign-in link.
    const summary = Object.fromEntries(
      Object.entries(p).filter(([k]) => ["to", "subject", "groupSlug", "agentSlug"].includes(k)),
    );
    return {
      id: j.id,
      kind: j.kind,
      status: j.status,
      attempts: j.attempts,
      maxAttempts: j.maxAttempts,
      runAt: j.runAt.toISOString(),
      lockedBy: j.lockedBy,
      lastError: j.lastError,
      updatedAt: j.updatedAt.toISOString(),
      summary,
    };
  };
  return {
    counts,
    failing: rows.filter((j) => j.lastError !== null || j.status === "failed").map(view),
    running: rows.filter((j) => j.status === "running").map(view),
    rounds: rows.filter((j) => j.dedupeKey?.startsWith("round:")).map(view),
  };
}

/**
 * POST /api/admin/jobs: run a round now in this process ({ run: kind }) — its own claims still keep each
 * digest, reminder and backup to once — or queue a failed job again ({ retry: id }).
 */
export async function adminJobAction(
  { actor }: Caller,
  action: { run: string } | { retry: string },
): Promise<{ ran?: string; retried?: string }> {
  authorize(actor, canReadJobs, "run background jobs");
  if ("run" in action) {
    const h = registry().handlers.get(action.run);
    if (!h?.everyMs)
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        { path: "run", message: `run names a round: ${roundKinds().join(", ")}.` },
      ]);
    await h.run({}, { now: new Date(), attempt: 1 });
    return { ran: action.run };
  }
  const db = await getDb();
  const [row] = await db
    .update(jobs)
    .set({ status: "queued", runAt: new Date(), attempts: 0, updatedAt: new Date() })
    .where(and(eq(jobs.id, action.retry), eq(jobs.status, "failed")))
    .returning({ id: jobs.id });
  if (!row) throw new AppError("not_found", "No failed job has that id; only failed jobs can be queued again.");
  void kickJobs();
  return { retried: row.id };
}

export function roundKinds(): string[] {
  return [...registry().handlers]
    .filter(([, h]) => h.everyMs)
    .map(([k]) => k)
    .sort();
}
