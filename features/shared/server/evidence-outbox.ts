import { sql, type SQL } from "drizzle-orm";
import { schema, type Db } from "@/db/client";

/**
 * The evidence outbox, written by every change that moves published figures (accept, retract, correction,
 * import, catalogue and settings changes) inside that change's own transaction. It lives here, below every
 * feature, so review and catalogue can record what they touched without importing evidence (which sits above
 * them); the evidence worker drains it (features/evidence/server/worker.ts, docs/architecture.md).
 */

/** The database or an open transaction: the enqueue runs in the caller's transaction. */
export type OutboxExecutor = Pick<Db, "insert" | "execute">;

export interface EvidencePair {
  groupSlug: string | null | undefined;
  agentSlug: string | null | undefined;
}

/** Records the group × agent pairs a change touched (pairs missing either side count in no summary). */
export async function enqueueEvidenceRecompute(tx: OutboxExecutor, pairs: EvidencePair[]): Promise<number> {
  const seen = new Map<string, { groupSlug: string; agentSlug: string }>();
  for (const p of pairs) {
    if (!p.groupSlug || !p.agentSlug) continue;
    seen.set(`${p.groupSlug}\u0000${p.agentSlug}`, { groupSlug: p.groupSlug, agentSlug: p.agentSlug });
  }
  if (seen.size === 0) return 0;
  await tx.insert(schema.evidenceOutbox).values([...seen.values()]);
  return seen.size;
}

/**
 * Records every pair that has accepted reports or a stored summary, optionally only within some groups
 * and/or agents (a settings change: everything; a renamed group: its pairs; new band edges: the agent's).
 */
export async function enqueueEvidenceRecomputeWhere(
  tx: OutboxExecutor,
  scope: { groupSlugs?: string[]; agentSlugs?: string[] } = {},
): Promise<void> {
  const within = (column: string, values: string[] | undefined): SQL =>
    values
      ? values.length
        ? sql`${sql.identifier(column)} in (${sql.join(
            values.map((v) => sql`${v}`),
            sql`, `,
          )})`
        : sql`false`
      : sql`true`;
  await tx.execute(sql`
    insert into evidence_outbox (group_slug, agent_slug)
    select group_slug, agent_slug
      from (select group_slug, agent_slug from reports where status = 'accepted' and group_slug is not null and agent_slug is not null
            union
            select group_slug, agent_slug from evidence_summaries) pairs
     where ${within("group_slug", scope.groupSlugs)} and ${within("agent_slug", scope.agentSlugs)}`);
}

// On globalThis: Next.js bundles instrumentation (which starts the worker) apart from the route handlers.
const hooks = globalThis as unknown as { __tankloreEvidenceWake?: () => void };

/** The evidence worker registers how to wake it. */
export function setEvidenceWorkerWake(wake: (() => void) | undefined): void {
  hooks.__tankloreEvidenceWake = wake;
}

/**
 * Call after the transaction that enqueued pairs has committed: this process's worker recomputes at once
 * instead of at its next poll. Without a running worker (scripts, tests) it does nothing.
 */
export function wakeEvidenceWorker(): void {
  hooks.__tankloreEvidenceWake?.();
}
