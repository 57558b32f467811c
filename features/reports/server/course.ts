import "server-only";
import { and, count, eq, isNull, lte, max } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { publicBaseUrl } from "@/features/shared/env";
import { sendMail } from "@/features/mail/server";
import type { z } from "zod";
import type { courseEntrySchema } from "../schemas";
import { canSeeReport, getReportRowById } from "./queries";
import { recordEvent, saveDerived } from "./mutations";

const { reports, courseEntries, reminders, agents, users } = schema;
const HOUR = 3600_000;

/** The member logs a dose or an observation on an open course; due reminders are (re)scheduled. */
export async function addCourseEntry(actor: Actor | null, reportId: string, entry: z.infer<typeof courseEntrySchema>) {
  if (!actor) throw new AppError("unauthenticated", "Sign in to log a treatment course.");
  const row = await getReportRowById(reportId);
  if (!row || !canSeeReport(actor, row)) throw notFound("That report");
  if (row.authorId !== actor.id) throw new AppError("forbidden", "Only the member who keeps a course may log in it.");
  if (row.status !== "draft") throw new AppError("conflict", "This course has been submitted; its log is closed.");
  const db = await getDb();
  const at = new Date(entry.at);
  if (entry.photoId) {
    const [photo] = await db.select({ reportId: schema.photos.reportId }).from(schema.photos).where(eq(schema.photos.id, entry.photoId));
    if (photo?.reportId !== reportId) throw new AppError("invalid", "Some fields need fixing; see issues.", [{ path: "photoId", message: "That photo does not belong to this report; upload it to the report first." }]);
  }
  return db.transaction(async (tx) => {
    const [saved] = await tx
      .insert(courseEntries)
      .values({ reportId, kind: entry.kind, at, amountMl: entry.amountMl ?? null, text: entry.text ?? null, photoId: entry.photoId ?? null })
      .returning();
    if (entry.kind === "dose") {
      // The report follows the log: number of doses, and the peak single dose as "amount per dose".
      const [agg] = await tx
        .select({ n: count(), peak: max(courseEntries.amountMl) })
        .from(courseEntries)
        .where(and(eq(courseEntries.reportId, reportId), eq(courseEntries.kind, "dose")));
      await tx.update(reports).set({ doses: agg?.n ?? 1, amountMl: agg?.peak ?? null, courseOpen: true, updatedAt: new Date() }).where(eq(reports.id, reportId));
      await saveDerived(tx, reportId);
      await tx.delete(reminders).where(and(eq(reminders.reportId, reportId), isNull(reminders.sentAt)));
      const [agent] = row.agentSlug ? await tx.select().from(agents).where(eq(agents.slug, row.agentSlug)) : [];
      const interval = row.intervalHours ?? agent?.redoseHours ?? null;
      if (interval) await tx.insert(reminders).values({ reportId, userId: actor.id, kind: "next_dose", dueAt: new Date(at.getTime() + interval * HOUR) });
      await tx.insert(reminders).values({ reportId, userId: actor.id, kind: "outcome", dueAt: new Date(at.getTime() + (agent?.watchDays ?? 7) * 24 * HOUR) });
      await recordEvent(tx, { reportId, actorId: actor.id, action: "dose_logged", from: "draft", to: "draft", note: `${entry.amountMl} mL` });
    }
    return { id: saved!.id, kind: saved!.kind, at: saved!.at.toISOString(), amountMl: saved!.amountMl, text: saved!.text, photoId: saved!.photoId };
  });
}

const reminderText = {
  next_dose: { subject: "Next dose due", lead: "By the interval you chose, the next dose of your treatment course is due now." },
  outcome: { subject: "Time to record the outcome", lead: "Your watching period after the last dose is over: record how the course ended." },
} as const;

/**
 * Sends reminders that have fallen due. Each is claimed (sent_at set) before mailing, so two ticks
 * never send one twice; a failed send is released for the next tick. Due times live in the database,
 * so a restart loses none.
 */
export async function runDueReminders(now = new Date()): Promise<number> {
  const db = await getDb();
  const due = await db
    .select({ id: reminders.id, kind: reminders.kind, reportId: reminders.reportId, email: users.email, name: users.name, status: reports.status })
    .from(reminders)
    .innerJoin(users, eq(users.id, reminders.userId))
    .innerJoin(reports, eq(reports.id, reminders.reportId))
    .where(and(isNull(reminders.sentAt), lte(reminders.dueAt, now)))
    .limit(50);
  let sent = 0;
  for (const r of due) {
    const [claimed] = await db.update(reminders).set({ sentAt: now }).where(and(eq(reminders.id, r.id), isNull(reminders.sentAt))).returning({ id: reminders.id });
    if (!claimed || r.status !== "draft") continue;
    const t = reminderText[r.kind as keyof typeof reminderText] ?? reminderText.outcome;
    try {
      await sendMail({
        to: r.email,
        subject: `Tanklore: ${t.subject}`,
        text: `Hello ${r.name},\n\n${t.lead}\n\nOpen your course log: ${publicBaseUrl()}/reports/${r.reportId}\n\nWatch the fish closely after every dose, and be ready for a large, temperature-matched water change.\n\n— Tanklore`,
      });
      sent += 1;
    } catch (err) {
      console.error("A reminder could not be sent; it will be tried again.", err);
      await db.update(reminders).set({ sentAt: null }).where(eq(reminders.id, r.id));
    }
  }
  return sent;
}

const store = globalThis as unknown as { __tankloreReminders?: NodeJS.Timeout };

/** The in-process scheduler: checks for due reminders every minute. */
export function startReminderScheduler(everyMs = 60_000): void {
  if (store.__tankloreReminders) return;
  store.__tankloreReminders = setInterval(() => {
    runDueReminders().catch((err) => console.error("Reminder check failed:", err));
  }, everyMs);
  store.__tankloreReminders.unref();
}
