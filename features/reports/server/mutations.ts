import "server-only";
import crypto from "node:crypto";
import { and, eq } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { zodIssues } from "@/features/shared/server/http";
import {
  claimIdempotencyKey,
  storeIdempotentResponse,
  type IdempotencyClaim,
} from "@/features/shared/server/idempotency";
import { reportDraftSchema, reportInputSchema, type ReportDraft, type ReportInput } from "../schemas";
import { checkReferences, derive } from "./derive";
import { computeFlags } from "./flags";
import { toColumns, toInput, type ReportRow } from "./mapping";
import { canSeeReport, getReportRowById } from "./queries";

const { reports, reportEvents } = schema;
type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export async function recordEvent(
  tx: Tx | Db,
  e: {
    reportId: string;
    actorId: string | null;
    action: string;
    from: string | null;
    to: string | null;
    note?: string | null;
  },
): Promise<void> {
  await tx.insert(reportEvents).values({
    reportId: e.reportId,
    actorId: e.actorId,
    action: e.action,
    fromStatus: e.from,
    toStatus: e.to,
    note: e.note ?? null,
  });
}

function requireMember(actor: Actor | null): asserts actor is Actor {
  if (!actor) throw new AppError("unauthenticated", "Sign in to report a treatment.");
}

/** The owner's report in an editable state, or the right error (404 hides others' reports). */
async function ownEditable(actor: Actor, id: string, states: string[], what: string): Promise<ReportRow> {
  const row = await getReportRowById(id);
  if (!row || !canSeeReport(actor, row)) throw notFound("That report");
  if (row.authorId !== actor.id) throw new AppError("forbidden", `Only the member who filed a report may ${what} it.`);
  if (!states.includes(row.status)) {
    throw new AppError(
      "conflict",
      `This report is ${row.status.replace("_", " ")}; it can be ${what === "delete" ? "deleted" : "changed"} only while ${states.map((s) => s.replace("_", " ")).join(" or ")}.`,
    );
  }
  return row;
}

/**
 * Takes the report's row lock inside a transaction and checks its status again there: the check before the
 * transaction is a quick answer, this one is the one that holds. A PATCH, a logged dose or a photo racing a
 * submit or a decision queues on the lock and then finds the report no longer editable (409), so nothing changes
 * a report after its flags were computed. (PGlite runs one transaction at a time; a PostgreSQL server needs it.)
 */
export async function lockEditable(tx: Tx, id: string, states: readonly string[], message: string): Promise<ReportRow> {
  const [row] = await tx.select().from(reports).where(eq(reports.id, id)).for("update");
  if (!row || !states.includes(row.status)) throw new AppError("conflict", message);
  return row;
}

const CHANGED_MEANWHILE =
  "This report was submitted or decided while you were changing it, so nothing was changed; reload it to see where it stands.";

export async function saveDerived(tx: Tx, id: string): Promise<ReportRow> {
  const [row] = await tx.select().from(reports).where(eq(reports.id, id));
  const derived = await derive(tx as unknown as Db, row!);
  const [updated] = await tx.update(reports).set(derived).where(eq(reports.id, id)).returning();
  return updated!;
}

async function submitInTx(tx: Tx, row: ReportRow, actor: Actor): Promise<ReportRow> {
  const parsed = reportInputSchema.safeParse(toInput(row));
  if (!parsed.success) {
    throw new AppError(
      "invalid",
      "The report is not complete yet: fill in the fields listed in issues, then submit again.",
      // The likely cause of losses is asked only once fish were lost; with the count missing, that is asked first.
      zodIssues(parsed.error).filter(
        (i) => !(i.path === "outcome.lossCause" && !(row.fishLost != null && row.fishLost > 0)),
      ),
    );
  }
  const { flags, completeness } = await computeFlags(tx as unknown as Db, row);
  const [updated] = await tx
    .update(reports)
    .set({
      status: "awaiting_review",
      flags,
      completeness,
      courseOpen: false,
      submittedAt: new Date(),
      updatedAt: new Date(),
    })
    .where(and(eq(reports.id, row.id), eq(reports.status, row.status)))
    .returning();
  if (!updated) throw new AppError("conflict", "The report changed while you submitted it; reload and try again.");
  await recordEvent(tx, {
    reportId: row.id,
    actorId: actor.id,
    action: row.status === "returned" ? "resubmitted" : "submitted",
    from: row.status,
    to: "awaiting_review",
  });
  return updated;
}

/**
 * POST /api/reports: a complete report, saved as a draft or submitted at once. Nothing is stored on error.
 * With an Idempotency-Key claim, the key and its response are stored in the same transaction as the report.
 */
export async function createReport(actor: Actor | null, input: ReportInput, idempotency?: IdempotencyClaim) {
  requireMember(actor);
  const db = await getDb();
  const columns = toColumns(input);
  await checkReferences(db, columns);
  const id = crypto.randomUUID();
  return db.transaction(async (tx) => {
    await claimIdempotencyKey(tx, idempotency);
    await tx.insert(reports).values({ ...columns, id, authorId: actor.id, status: "draft" });
    await recordEvent(tx, { reportId: id, actorId: actor.id, action: "created", from: null, to: "draft" });
    const saved = await saveDerived(tx, id);
    const row = input.submit ? await submitInTx(tx, saved, actor) : saved;
    const result = { id: row.id, status: row.status, concentration: row.concentration };
    await storeIdempotentResponse(tx, idempotency, result);
    return result;
  });
}

/** A draft with any subset of the fields (the multi-step form's first step, or an open course). */
export async function createDraft(actor: Actor | null, draft: ReportDraft) {
  requireMember(actor);
  const db = await getDb();
  const columns = toColumns(draft);
  await checkReferences(db, columns);
  const id = crypto.randomUUID();
  const row = await db.transaction(async (tx) => {
    await tx
      .insert(reports)
      .values({ ...columns, id, authorId: actor.id, status: "draft", courseOpen: draft.courseOpen ?? false });
    await recordEvent(tx, {
      reportId: id,
      actorId: actor.id,
      action: draft.courseOpen ? "course_opened" : "created",
      from: null,
      to: "draft",
    });
    return saveDerived(tx, id);
  });
  return { id: row.id, status: row.status, concentration: row.concentration };
}

/** PATCH: the owner changes a draft or returned report; nested objects merge; the merged whole is re-checked. */
export async function updateReport(actor: Actor | null, id: string, patch: ReportDraft) {
  requireMember(actor);
  const row = await ownEditable(actor, id, ["draft", "returned"], "change");
  const db = await getDb();
  const current = toInput(row) as Record<string, Record<string, unknown> | unknown>;
  const merged: Record<string, unknown> = { ...current, ...patch };
  for (const k of ["water", "treatment", "outcome"] as const) {
    if (patch[k]) merged[k] = { ...(current[k] as object), ...patch[k] };
  }
  if (patch.outcome && "fishLost" in patch.outcome && patch.outcome.fishLost === 0 && !("lossCause" in patch.outcome)) {
    (merged.outcome as Record<string, unknown>).lossCause = null;
  }
  // Keep only what is set, then check the merged report with the draft rules.
  const clean = JSON.parse(JSON.stringify(merged));
  const parsed = reportDraftSchema.safeParse({
    ...clean,
    ...(patch.courseOpen !== undefined ? { courseOpen: patch.courseOpen } : {}),
  });
  if (!parsed.success) throw new AppError("invalid", "Some fields need fixing; see issues.", zodIssues(parsed.error));
  const columns = toColumns(patch);
  if (
    patch.outcome?.lossCause === undefined &&
    merged.outcome &&
    (merged.outcome as { lossCause?: unknown }).lossCause === null
  )
    columns.lossCause = null;
  await checkReferences(db, columns);
  const updated = await db.transaction(async (tx) => {
    await lockEditable(tx, id, ["draft", "returned"], CHANGED_MEANWHILE);
    await tx
      .update(reports)
      .set({
        ...columns,
        ...(patch.courseOpen !== undefined ? { courseOpen: patch.courseOpen } : {}),
        updatedAt: new Date(),
      })
      .where(eq(reports.id, id));
    return saveDerived(tx, id);
  });
  return { id: updated.id, status: updated.status, concentration: updated.concentration };
}

export async function submitReport(actor: Actor | null, id: string) {
  requireMember(actor);
  const row = await ownEditable(actor, id, ["draft", "returned"], "submit");
  const db = await getDb();
  const updated = await db.transaction(async (tx) => {
    await lockEditable(tx, row.id, ["draft", "returned"], "This report was submitted or decided meanwhile; reload it.");
    return submitInTx(tx, await saveDerived(tx, row.id), actor);
  });
  return { id: updated.id, status: updated.status };
}

export async function deleteDraft(actor: Actor | null, id: string) {
  requireMember(actor);
  await ownEditable(actor, id, ["draft"], "delete");
  const db = await getDb();
  const deleted = await db
    .delete(reports)
    .where(and(eq(reports.id, id), eq(reports.status, "draft")))
    .returning({ id: reports.id });
  if (!deleted.length) throw new AppError("conflict", "The report is no longer a draft.");
  return { id, deleted: true };
}
