import { and, count, eq, gte, ilike, lt, ne, or, sql, type SQL } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import type { Actor } from "@/features/shared/roles";
import { invalid } from "@/features/shared/server/http";
import { assertRole } from "@/features/members/server";
import { listAllQuerySchema, type AllReportsRow, type ListAllQuery } from "../schemas";

const { reports, species, speciesGroups, agents, users } = schema;

/** `%`, `_` and `\` typed by a moderator match themselves. */
const likeable = (s: string) => `%${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

const nextDay = (d: string) => new Date(Date.parse(`${d}T00:00:00Z`) + 86_400_000);

function filters(q: ListAllQuery): SQL | undefined {
  const at = { submitted: reports.submittedAt, decided: reports.decidedAt }[q.dateOf as "submitted" | "decided"];
  const dates: (SQL | undefined)[] =
    q.dateOf === "started"
      ? [q.from ? gte(reports.startedOn, q.from) : undefined, q.to ? sql`${reports.startedOn} <= ${q.to}` : undefined]
      : [q.from ? gte(at, new Date(`${q.from}T00:00:00Z`)) : undefined, q.to ? lt(at, nextDay(q.to)) : undefined];
  return and(
    ne(reports.status, "draft"),
    q.status ? eq(reports.status, q.status as AllReportsRow["status"]) : undefined,
    q.group ? eq(reports.groupSlug, q.group) : undefined,
    q.agent ? eq(reports.agentSlug, q.agent) : undefined,
    q.member
      ? or(
          eq(reports.authorId, q.member),
          ilike(users.name, likeable(q.member)),
          ilike(users.email, likeable(q.member)),
          ilike(reports.externalReporter, likeable(q.member)),
        )
      : undefined,
    ...dates,
  );
}

/**
 * Every submitted report (drafts stay private), for moderators and admins: filtered by status, group,
 * agent, member and a date range, sorted and paged here, so a moderator can find an accepted report to retract.
 * Checks the role before reading the parameters: a member learns nothing but that the list is not theirs.
 */
export async function listAllReports({ actor, params }: { actor: Actor | null; params: Record<string, string> }) {
  assertRole(actor, ["moderator", "admin"], "list every report");
  const parsed = listAllQuerySchema.safeParse(params);
  if (!parsed.success) throw invalid(parsed.error, "Some query parameters need fixing; see issues.");
  const q = parsed.data;
  const db = await getDb();
  const where = filters(q);
  const col = {
    submittedAt: reports.submittedAt,
    decidedAt: reports.decidedAt,
    startedOn: reports.startedOn,
    status: reports.status,
    concentration: reports.concentration,
    species: sql`coalesce(${species.commonName}, ${reports.speciesOther})`,
    group: speciesGroups.name,
    agent: agents.name,
    member: sql`coalesce(${reports.externalReporter}, ${users.name})`,
  }[q.sort];
  // Empty values last whichever way, then the id: a stable order, so pages neither repeat nor skip a report.
  const order = sql`${col} ${sql.raw(q.dir === "asc" ? "asc" : "desc")} nulls last`;
  const base = () =>
    db
      .select({
        id: reports.id,
        status: reports.status,
        startedOn: reports.startedOn,
        submittedAt: reports.submittedAt,
        decidedAt: reports.decidedAt,
        concentration: reports.concentration,
        speciesName: species.commonName,
        speciesOther: reports.speciesOther,
        groupSlug: reports.groupSlug,
        groupName: speciesGroups.name,
        agentSlug: reports.agentSlug,
        agentName: agents.name,
        unit: agents.unit,
        authorId: reports.authorId,
        authorName: users.name,
        externalReporter: reports.externalReporter,
        flags: reports.flags,
        source: reports.source,
      })
      .from(reports)
      .innerJoin(users, eq(users.id, reports.authorId))
      .leftJoin(species, eq(species.id, reports.speciesId))
      .leftJoin(speciesGroups, eq(speciesGroups.slug, reports.groupSlug))
      .leftJoin(agents, eq(agents.slug, reports.agentSlug));
  const [rows, [total]] = await Promise.all([
    base()
      .where(where)
      .orderBy(order, sql`${reports.id} asc`)
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(reports).innerJoin(users, eq(users.id, reports.authorId)).where(where),
  ]);
  return {
    reports: rows.map((r): AllReportsRow => ({
      id: r.id,
      status: r.status as AllReportsRow["status"],
      species: r.speciesName ?? `${r.speciesOther ?? "?"} (not listed)`,
      groupSlug: r.groupSlug,
      groupName: r.groupName,
      agentSlug: r.agentSlug,
      agentName: r.agentName,
      concentration: r.concentration,
      unit: r.unit,
      startedOn: r.startedOn,
      submittedAt: r.submittedAt?.toISOString() ?? null,
      decidedAt: r.decidedAt?.toISOString() ?? null,
      member: { id: r.authorId, name: r.externalReporter ?? r.authorName },
      isMine: r.authorId === actor.id,
      flags: Array.isArray(r.flags) ? r.flags.length : 0,
      source: r.source,
    })),
    total: total?.n ?? 0,
    page: q.page,
    pageSize: q.pageSize,
  };
}
