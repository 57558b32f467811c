import "server-only";
import { asc, count, desc, eq, sql } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import type { Actor } from "@/features/shared/roles";
import { authorize, canReview, type Caller } from "@/features/shared/policies";
import { notFound } from "@/features/shared/errors";
import { getReportById, getReportHistory } from "@/features/reports/server";

const { reports, species, speciesGroups, agents, users } = schema;

export async function getReviewQueue(actor: Actor | null, order: "oldest" | "completeness" = "oldest") {
  authorize(actor, canReview, "review reports");
  const db = await getDb();
  const rows = await db
    .select({
      id: reports.id,
      submittedAt: reports.submittedAt,
      concentration: reports.concentration,
      flags: reports.flags,
      completeness: reports.completeness,
      speciesName: species.commonName,
      speciesOther: reports.speciesOther,
      groupSlug: reports.groupSlug,
      groupName: speciesGroups.name,
      agentSlug: reports.agentSlug,
      agentName: agents.name,
      unit: agents.unit,
      authorId: reports.authorId,
      authorName: users.name,
      source: reports.source,
    })
    .from(reports)
    .leftJoin(species, eq(species.id, reports.speciesId))
    .leftJoin(speciesGroups, eq(speciesGroups.slug, reports.groupSlug))
    .leftJoin(agents, eq(agents.slug, reports.agentSlug))
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(eq(reports.status, "awaiting_review"))
    .orderBy(
      ...(order === "completeness"
        ? [desc(reports.completeness), asc(reports.submittedAt)]
        : [asc(reports.submittedAt)]),
      asc(reports.id),
    );
  return {
    reports: rows.map((r) => ({
      ...r,
      species: r.speciesName ?? `${r.speciesOther ?? "?"} (not listed)`,
      submittedAt: r.submittedAt?.toISOString() ?? null,
      isMine: r.authorId === actor.id,
    })),
  };
}

/** How many reports wait for a moderator: for reviewers. */
export async function countAwaitingReview({ actor }: Caller): Promise<number> {
  authorize(actor, canReview, "see the review queue");
  const db = await getDb();
  const [n] = await db.select({ n: count() }).from(reports).where(eq(reports.status, "awaiting_review"));
  return n?.n ?? 0;
}

/** Where a dose falls against the group's accepted reports for the agent (quartiles in SQL): for reviewers. */
export async function getGroupContext(
  { actor }: Caller,
  groupSlug: string | null,
  agentSlug: string | null,
  dose: number | null,
) {
  authorize(actor, canReview, "review reports");
  if (!groupSlug || !agentSlug) return null;
  const db = await getDb();
  const res = await db.execute(sql`
    select count(*)::int as n,
           min(concentration) as min,
           percentile_cont(0.25) within group (order by concentration) as p25,
           percentile_cont(0.5) within group (order by concentration) as median,
           percentile_cont(0.75) within group (order by concentration) as p75,
           max(concentration) as max,
           count(*) filter (where concentration < ${dose ?? 0})::int as below
      from reports
     where status = 'accepted' and group_slug = ${groupSlug} and agent_slug = ${agentSlug} and concentration is not null`);
  const row = (res as unknown as { rows: Record<string, number | null>[] }).rows[0]!;
  return {
    n: Number(row.n),
    min: row.min,
    p25: row.p25,
    median: row.median,
    p75: row.p75,
    max: row.max,
    below: Number(row.below),
  };
}

/**
 * Everything the review page shows about one submitted report: the report with its notes and flags,
 * its history and where its dose falls. Only reviewers (403 otherwise); drafts do not exist here (404).
 */
export async function getReviewPage({ actor }: Caller, id: string) {
  authorize(actor, canReview, "review reports");
  const report = await getReportById(actor, id);
  if (report.status === "draft") throw notFound("That report");
  const [history, context] = await Promise.all([
    getReportHistory(actor, id),
    getGroupContext({ actor }, report.groupSlug, report.treatment.agentSlug, report.concentration),
  ]);
  return { report, history, context };
}
