import "server-only";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { unauthenticated } from "@/features/shared/errors";
import { canReview, isSignedIn, type Caller } from "@/features/shared/policies";
import { nextDosesOf } from "./course";

const { reports, species, agents, reportEvents } = schema;
const DECISIONS = ["accept", "return", "decline", "retract"];

/**
 * What a signed-in member's start page shows: their open courses with the next dose, reports returned for changes,
 * drafts, and recent decisions on their reports; for reviewers also the oldest report waiting (the queue's count
 * comes from the review feature, composed in the page).
 */
export async function getMemberHome({ actor }: Caller) {
  if (!isSignedIn(actor)) throw unauthenticated();
  const db = await getDb();
  const label = {
    id: reports.id,
    speciesName: species.commonName,
    speciesOther: reports.speciesOther,
    agentName: agents.name,
    updatedAt: reports.updatedAt,
  };
  const name = (r: { speciesName: string | null; speciesOther: string | null; agentName: string | null }) =>
    [r.speciesName ?? (r.speciesOther ? `${r.speciesOther} (not listed)` : "Species not given yet"), r.agentName]
      .filter(Boolean)
      .join(" · ");
  const mine = (status: string) =>
    db
      .select({ ...label, row: reports })
      .from(reports)
      .leftJoin(species, eq(species.id, reports.speciesId))
      .leftJoin(agents, eq(agents.slug, reports.agentSlug))
      .where(and(eq(reports.authorId, actor.id), eq(reports.status, status as "draft")))
      .orderBy(desc(reports.updatedAt), asc(reports.id))
      .limit(50);

  const [drafts, returned, decisions] = await Promise.all([
    mine("draft"),
    mine("returned"),
    db
      .select({ ...label, action: reportEvents.action, note: reportEvents.note, at: reportEvents.at })
      .from(reportEvents)
      .innerJoin(reports, eq(reports.id, reportEvents.reportId))
      .leftJoin(species, eq(species.id, reports.speciesId))
      .leftJoin(agents, eq(agents.slug, reports.agentSlug))
      .where(and(eq(reports.authorId, actor.id), inArray(reportEvents.action, DECISIONS)))
      .orderBy(desc(reportEvents.at), desc(reportEvents.id))
      .limit(5),
  ]);
  const courses = drafts.filter((d) => d.row.courseOpen);
  const figures = await nextDosesOf(courses.map((c) => c.row));
  const returnNotes = returned.length
    ? await db
        .select({ reportId: reportEvents.reportId, note: reportEvents.note })
        .from(reportEvents)
        .where(
          and(
            inArray(
              reportEvents.reportId,
              returned.map((r) => r.id),
            ),
            eq(reportEvents.action, "return"),
          ),
        )
        .orderBy(asc(reportEvents.at), asc(reportEvents.id))
    : [];
  const lastNote = new Map(returnNotes.map((n) => [n.reportId, n.note]));

  let oldestAwaiting = null;
  if (canReview(actor)) {
    const [o] = await db
      .select({
        id: reports.id,
        submittedAt: reports.submittedAt,
        speciesName: species.commonName,
        speciesOther: reports.speciesOther,
        agentName: agents.name,
      })
      .from(reports)
      .leftJoin(species, eq(species.id, reports.speciesId))
      .leftJoin(agents, eq(agents.slug, reports.agentSlug))
      .where(eq(reports.status, "awaiting_review"))
      .orderBy(asc(reports.submittedAt), asc(reports.id))
      .limit(1);
    oldestAwaiting = o ? { id: o.id, title: name(o), submittedAt: o.submittedAt?.toISOString() ?? null } : null;
  }

  return {
    openCourses: courses.map((c, i) => ({
      id: c.id,
      title: name(c),
      nextDose: figures[i]!.nextDose,
      watchUntil: figures[i]!.watchUntil,
    })),
    returned: returned.map((r) => ({
      id: r.id,
      title: name(r),
      note: lastNote.get(r.id) ?? null,
      updatedAt: r.updatedAt.toISOString(),
    })),
    drafts: drafts
      .filter((d) => !d.row.courseOpen)
      .map((d) => ({ id: d.id, title: name(d), updatedAt: d.updatedAt.toISOString() })),
    recentDecisions: decisions.map((d) => ({
      reportId: d.id,
      title: name(d),
      action: d.action,
      note: d.note,
      at: d.at.toISOString(),
    })),
    oldestAwaiting,
  };
}
export type MemberHome = Awaited<ReturnType<typeof getMemberHome>>;
