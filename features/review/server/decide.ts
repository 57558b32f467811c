import "server-only";
import { and, asc, desc, eq } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { getDb, schema } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import { publicBaseUrl } from "@/features/shared/env";
import { enqueueEvidenceRecompute, wakeEvidenceWorker } from "@/features/shared/server/evidence-outbox";
import type { Actor } from "@/features/shared/roles";
import { assertRole } from "@/features/members/server";
import { sendMail } from "@/features/mail/server";
import { derive, getReportRowById, recordEvent } from "@/features/reports/server";
import { describeHistoryAction, statusLabels, type ReportStatus } from "@/features/reports";
import { formatDayTime } from "@/features/shared/format-time";
import { decisionStatus, overrideNoteMin, type CorrectionInput, type DecisionInput } from "../schemas";

const { reports, reportEvents, users, species } = schema;

const words = {
  accept: { subject: "accepted", lead: "A moderator accepted your report: it now counts in the club's evidence." },
  return: {
    subject: "returned for changes",
    lead: "A moderator returned your report for changes. Their note says what to fix; edit the report and submit it again.",
  },
  decline: { subject: "declined", lead: "A moderator declined your report. Their reason is below." },
  retract: {
    subject: "retracted",
    lead: "A moderator retracted your report from the evidence. Their reason is below.",
  },
} as const;
/** A decision named in a sentence, for the conflict message. */
const decisionWords = {
  accept: "accept",
  return: "return for changes",
  decline: "decline",
  retract: "retract",
  propose_accept: "accept, pending a second moderator",
} as const;

export interface DecisionResult {
  id: string;
  status: string;
  groupSlug: string | null;
  agentSlug: string | null;
}

/**
 * A moderator's decision. Nobody decides on their own report. The status change is conditional on
 * the status the decision applies to, so of two moderators deciding at once the second gets 409
 * with what happened.
 */
export async function decideReport(actor: Actor | null, id: string, input: DecisionInput): Promise<DecisionResult> {
  assertRole(actor, ["moderator", "admin"], "decide on reports");
  const row = await getReportRowById(id);
  if (!row || row.status === "draft") throw notFound("That report");
  if (row.authorId === actor.id)
    throw new AppError("forbidden", "You cannot decide on your own report; another moderator has to.");
  const { from, to } = decisionStatus[input.decision];
  if (row.status !== from) throw await conflict(id, row.status, input.decision);
  if (input.decision === "accept" && !row.groupSlug) {
    throw new AppError(
      "conflict",
      "This species is not in the catalogue yet: map it to a catalogue species before accepting, so the report counts in a group.",
    );
  }
  const db = await getDb();
  const aboveCeiling = row.flags.some((f) => f.code === "above_ceiling");
  if (input.decision === "propose_accept") {
    if (!aboveCeiling)
      throw new AppError(
        "conflict",
        "Only a report flagged above the agent's plausible ceiling waits for a second moderator; accept it directly.",
      );
    if (await proposedBy(id, actor.id))
      throw new AppError("conflict", "You have already asked for a second moderator's accept on this report.");
    const ok = await db.transaction(async (tx) => {
      // Re-read under the transaction so a decision made meanwhile is not papered over with a proposal.
      const [cur] = await tx.select({ status: reports.status }).from(reports).where(eq(reports.id, id));
      if (cur?.status !== from) return false;
      await recordEvent(tx, {
        reportId: id,
        actorId: actor.id,
        action: "propose_accept",
        from,
        to,
        note: input.note || null,
      });
      return true;
    });
    if (!ok) throw await conflict(id, (await getReportRowById(id))?.status ?? "gone", input.decision);
    return { id, status: row.status, groupSlug: row.groupSlug, agentSlug: row.agentSlug };
  }
  // A dose above the agent's plausible ceiling is accepted by two moderators, or by one who writes down why.
  if (
    input.decision === "accept" &&
    aboveCeiling &&
    input.note.length < overrideNoteMin &&
    !(await proposedByAnother(id, actor.id))
  ) {
    throw new AppError(
      "invalid",
      "This dose is above the agent's plausible ceiling: write an override note, or ask a second moderator to accept it too.",
      [
        {
          path: "note",
          message: `Write an override note of at least ${overrideNoteMin} characters saying why this dose is plausible (for example, how the member measured it), or choose "Ask a second moderator" so another moderator's accept completes it.`,
        },
      ],
    );
  }
  const updated = await db.transaction(async (tx) => {
    const [u] = await tx
      .update(reports)
      .set({ status: to as typeof row.status, decidedAt: new Date(), updatedAt: new Date() })
      .where(and(eq(reports.id, id), eq(reports.status, from as typeof row.status)))
      .returning();
    if (!u) return null;
    await recordEvent(tx, {
      reportId: id,
      actorId: actor.id,
      action: input.decision,
      from,
      to,
      note: input.note || null,
    });
    // Accept and retract change what counts: the summaries they touch go stale with this same commit.
    if (to === "accepted" || from === "accepted") await enqueueEvidenceRecompute(tx, [u]);
    return u;
  });
  if (!updated) throw await conflict(id, (await getReportRowById(id))?.status ?? "gone", input.decision);
  wakeEvidenceWorker();
  await notifyMember(updated.authorId, id, input.decision, input.note).catch((err) =>
    console.error("Decision mail failed (the decision stands):", err),
  );
  return { id, status: updated.status, groupSlug: updated.groupSlug, agentSlug: updated.agentSlug };
}

/** Accept proposals on this report (from its current review round) by moderators other than `actorId`. */
async function proposedByAnother(id: string, actorId: string): Promise<boolean> {
  return (await proposals(id)).some((p) => p !== actorId);
}
async function proposedBy(id: string, actorId: string): Promise<boolean> {
  return (await proposals(id)).includes(actorId);
}
async function proposals(id: string): Promise<string[]> {
  const db = await getDb();
  const events = await db
    .select({ action: reportEvents.action, actorId: reportEvents.actorId })
    .from(reportEvents)
    .where(eq(reportEvents.reportId, id))
    .orderBy(asc(reportEvents.at), asc(reportEvents.id));
  // A resubmission starts a new round: proposals made on an earlier version no longer count.
  const start = events.findLastIndex((e) => e.action === "submitted" || e.action === "resubmitted");
  return events
    .slice(start + 1)
    .filter((e) => e.action === "propose_accept" && e.actorId)
    .map((e) => e.actorId!);
}

async function conflict(id: string, status: string, decision: string): Promise<AppError> {
  const db = await getDb();
  const who = alias(users, "who");
  const [latest] = await db
    .select({ action: reportEvents.action, at: reportEvents.at, note: reportEvents.note, name: who.name })
    .from(reportEvents)
    .leftJoin(who, eq(who.id, reportEvents.actorId))
    .where(eq(reportEvents.reportId, id))
    .orderBy(desc(reportEvents.at), desc(reportEvents.id))
    .limit(1);
  const detail = latest
    ? ` Last change: ${latest.name ?? "someone"} ${describeHistoryAction(latest.action)}${latest.note ? ` (“${latest.note}”)` : ""} on ${formatDayTime(latest.at)}.`
    : "";
  const state =
    status === "gone"
      ? "no longer here"
      : (statusLabels[status as ReportStatus] ?? status.replaceAll("_", " ")).toLowerCase();
  return new AppError(
    "conflict",
    `This report is ${state}, so your decision (${decisionWords[decision as keyof typeof decisionWords] ?? decision}) no longer applies.${detail}`,
  );
}

async function notifyMember(userId: string, reportId: string, decision: DecisionInput["decision"], note: string) {
  if (decision === "propose_accept") return;
  const db = await getDb();
  const [u] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, userId));
  if (!u) return;
  const w = words[decision];
  await sendMail({
    to: u.email,
    subject: `Your Tanklore report was ${w.subject}`,
    text: `Hello ${u.name},\n\n${w.lead}\n${note ? `\nThe moderator's note:\n${note}\n` : ""}\nSee the report: ${publicBaseUrl()}/reports/${reportId}\n\n— Tanklore`,
  });
}

/** Corrections a moderator may make, each with a note in the audit trail. */
export async function correctReport(actor: Actor | null, id: string, input: CorrectionInput) {
  assertRole(actor, ["moderator", "admin"], "correct reports");
  const row = await getReportRowById(id);
  if (!row || row.status === "draft") throw notFound("That report");
  if (row.authorId === actor.id)
    throw new AppError("forbidden", "You cannot correct your own report; another moderator has to.");
  if (!["awaiting_review", "accepted"].includes(row.status))
    throw new AppError(
      "conflict",
      `This report is ${row.status.replace("_", " ")}; corrections apply while it awaits review or is accepted.`,
    );
  const db = await getDb();
  const result = await db.transaction(async (tx) => {
    if (input.kind === "species") {
      const [sp] = await tx.select().from(species).where(eq(species.id, input.speciesId));
      if (!sp)
        throw new AppError("invalid", "Some fields need fixing; see issues.", [
          { path: "speciesId", message: `No species "${input.speciesId}" in the catalogue.` },
        ]);
      await tx
        .update(reports)
        .set({ speciesId: sp.id, groupSlug: sp.groupSlug, updatedAt: new Date() })
        .where(eq(reports.id, id));
      await recordEvent(tx, {
        reportId: id,
        actorId: actor.id,
        action: "map_species",
        from: row.status,
        to: row.status,
        note: `${row.speciesOther ?? row.speciesId ?? "?"} → ${sp.scientificName}: ${input.note}`,
      });
    } else {
      if (!row.fishLost)
        throw new AppError("conflict", "No fish were lost in this report, so there is no cause to correct.");
      await tx.update(reports).set({ lossCause: input.lossCause, updatedAt: new Date() }).where(eq(reports.id, id));
      await recordEvent(tx, {
        reportId: id,
        actorId: actor.id,
        action: "correct_loss_cause",
        from: row.status,
        to: row.status,
        note: `${row.lossCause} → ${input.lossCause}: ${input.note}`,
      });
    }
    const [fresh] = await tx.select().from(reports).where(eq(reports.id, id));
    const d = await derive(tx as never, fresh!);
    const [u] = await tx.update(reports).set(d).where(eq(reports.id, id)).returning();
    // An accepted report's correction moves figures: of its group, and of the group it left.
    if (u!.status === "accepted")
      await enqueueEvidenceRecompute(tx, [u!, { groupSlug: row.groupSlug, agentSlug: u!.agentSlug }]);
    return {
      id,
      status: u!.status,
      groupSlug: u!.groupSlug,
      agentSlug: u!.agentSlug,
      previousGroupSlug: row.groupSlug,
    };
  });
  wakeEvidenceWorker();
  return result;
}
