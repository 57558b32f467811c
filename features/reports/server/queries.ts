import "server-only";
import { and, asc, count, desc, eq, inArray } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { getDb, schema } from "@/db/client";
import { notFound, unauthenticated } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { canReview, canSeeReport, isSignedIn, type Caller } from "@/features/shared/policies";
import { getCatalogue } from "@/features/catalogue/server";
import type { ListMineQuery, ReportStatus } from "../schemas";
import type { ReportRow } from "./mapping";

const { reports, species, agents, photos, reportEvents, users, courseEntries } = schema;

// The rule lives in the shared policy module; re-exported for existing callers.
export { canSeeReport };

/** The raw row, unchecked: for this and higher features' own writes after they check the caller. Never for a page. */
export async function getReportRowById(id: string): Promise<ReportRow | null> {
  const db = await getDb();
  const [row] = await db.select().from(reports).where(eq(reports.id, id));
  return row ?? null;
}

/** A visible report or a 404. */
export async function getVisibleReportRow(actor: Actor | null, id: string): Promise<ReportRow> {
  const row = await getReportRowById(id);
  if (!row || !canSeeReport(actor, row)) throw notFound("That report");
  return row;
}

export async function getReportById(actor: Actor | null, id: string) {
  const row = await getVisibleReportRow(actor, id);
  const db = await getDb();
  const [sp] = row.speciesId ? await db.select().from(species).where(eq(species.id, row.speciesId)) : [];
  const [agent] = row.agentSlug ? await db.select().from(agents).where(eq(agents.slug, row.agentSlug)) : [];
  const [author] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, row.authorId));
  const pics = await db.select().from(photos).where(eq(photos.reportId, id)).orderBy(asc(photos.createdAt));
  const [lastNote] = await db
    .select({ note: reportEvents.note, action: reportEvents.action, at: reportEvents.at })
    .from(reportEvents)
    .where(and(eq(reportEvents.reportId, id), inArray(reportEvents.action, ["return", "decline", "retract"])))
    .orderBy(desc(reportEvents.at), desc(reportEvents.id))
    .limit(1);
  const entries = await db
    .select()
    .from(courseEntries)
    .where(eq(courseEntries.reportId, id))
    .orderBy(asc(courseEntries.at), asc(courseEntries.id));
  const mine = actor?.id === row.authorId;
  return {
    id: row.id,
    status: row.status,
    source: row.source,
    isMine: mine,
    author: mine || row.showName || canReview(actor) ? { id: row.authorId, name: author?.name ?? "" } : null,
    species: sp
      ? { id: sp.id, scientificName: sp.scientificName, commonName: sp.commonName, groupSlug: sp.groupSlug }
      : null,
    speciesId: row.speciesId,
    speciesOther: row.speciesOther,
    groupSlug: row.groupSlug,
    fishCount: row.fishCount,
    sizeClass: row.sizeClass,
    conditionSlug: row.conditionSlug,
    startedOn: row.startedOn,
    water: {
      volume: row.waterVolume,
      volumeUnit: row.waterVolumeUnit,
      temperature: row.temperature,
      temperatureUnit: row.temperatureUnit,
      ph: row.ph,
      setting: row.setting,
      volumeL: row.volumeL,
      temperatureC: row.temperatureC,
    },
    treatment: {
      agentSlug: row.agentSlug,
      agentName: agent?.name ?? null,
      stockPercent: row.stockPercent,
      stockBasis: row.stockBasis,
      stockDensityGPerMl: row.stockDensityGPerMl,
      amountMl: row.amountMl,
      statedConcentration: row.statedConcentration,
      doses: row.doses,
      intervalHours: row.intervalHours,
      otherTreatments: row.otherTreatments,
    },
    outcome: {
      fishLost: row.fishLost,
      lossCause: row.lossCause,
      distress: row.distress,
      condition: row.conditionOutcome,
      observedDaysAfter: row.observedDaysAfter,
      notes: row.notes,
    },
    showName: row.showName,
    concentration: row.concentration,
    unit: agent?.unit ?? "mg/L",
    flags: canReview(actor) || mine ? row.flags : [],
    completeness: row.completeness,
    courseOpen: row.courseOpen,
    courseEntries: entries.map((e) => ({
      id: e.id,
      kind: e.kind,
      at: e.at.toISOString(),
      amountMl: e.amountMl,
      amountGrams: e.amountGrams,
      text: e.text,
      photoId: e.photoId,
      struckAt: e.struckAt?.toISOString() ?? null,
    })),
    lastNote: lastNote ? { action: lastNote.action, note: lastNote.note, at: lastNote.at.toISOString() } : null,
    photos: pics.map((p) => ({ id: p.id, width: p.width, height: p.height, bytes: p.bytes, stage: p.stage })),
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
    submittedAt: row.submittedAt?.toISOString() ?? null,
    decidedAt: row.decidedAt?.toISOString() ?? null,
  };
}
export type ReportView = Awaited<ReturnType<typeof getReportById>>;

/** The caller's own reports; a visitor has none to list (401). */
export async function getReportsByAuthorId(actor: Actor | null, q: ListMineQuery) {
  if (!isSignedIn(actor)) throw unauthenticated();
  const db = await getDb();
  const where = and(eq(reports.authorId, actor.id), q.status ? eq(reports.status, q.status) : undefined);
  const col = {
    updatedAt: reports.updatedAt,
    startedOn: reports.startedOn,
    status: reports.status,
    concentration: reports.concentration,
    species: species.commonName,
    agent: agents.name,
  }[q.sort];
  const rows = await db
    .select({
      id: reports.id,
      status: reports.status,
      startedOn: reports.startedOn,
      updatedAt: reports.updatedAt,
      submittedAt: reports.submittedAt,
      concentration: reports.concentration,
      speciesName: species.commonName,
      speciesOther: reports.speciesOther,
      agentName: agents.name,
      unit: agents.unit,
      courseOpen: reports.courseOpen,
      source: reports.source,
    })
    .from(reports)
    .leftJoin(species, eq(species.id, reports.speciesId))
    .leftJoin(agents, eq(agents.slug, reports.agentSlug))
    .where(where)
    .orderBy(q.dir === "asc" ? asc(col) : desc(col), desc(reports.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  const [total] = await db.select({ n: count() }).from(reports).where(where);
  return {
    reports: rows.map((r) => ({
      ...r,
      species: r.speciesName ?? (r.speciesOther ? `${r.speciesOther} (not listed)` : null),
      status: r.status as ReportStatus,
      updatedAt: r.updatedAt.toISOString(),
      submittedAt: r.submittedAt?.toISOString() ?? null,
    })),
    total: total?.n ?? 0,
    page: q.page,
    pageSize: q.pageSize,
  };
}

export async function getReportHistory(actor: Actor | null, id: string) {
  await getVisibleReportRow(actor, id);
  const db = await getDb();
  const who = alias(users, "who");
  const rows = await db
    .select({
      at: reportEvents.at,
      actorId: reportEvents.actorId,
      actorName: who.name,
      importedActor: reportEvents.actorName,
      action: reportEvents.action,
      from: reportEvents.fromStatus,
      to: reportEvents.toStatus,
      note: reportEvents.note,
    })
    .from(reportEvents)
    .leftJoin(who, eq(who.id, reportEvents.actorId))
    .where(eq(reportEvents.reportId, id))
    .orderBy(asc(reportEvents.at), asc(reportEvents.id));
  return {
    events: rows.map((e) => ({
      at: e.at.toISOString(),
      actor: e.actorId
        ? { id: e.actorId, name: e.actorName ?? "" }
        : e.importedActor
          ? { id: null, name: e.importedActor }
          : null,
      action: e.action,
      from: e.from,
      to: e.to,
      note: e.note,
    })),
  };
}

/** What the report form offers (visible species, conditions, agents): for signed-in members, who may report. */
export async function getReportFormCatalogue({ actor }: Caller) {
  if (!isSignedIn(actor)) throw unauthenticated();
  const c = await getCatalogue();
  return { species: c.species, conditions: c.conditions, agents: c.agents };
}
