import "server-only";
import { and, asc, eq, isNull, lte } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { publicBaseUrl } from "@/features/shared/env";
import { formatDay } from "@/features/shared/format-time";
import { queueMail } from "@/features/mail/server";
import { kickJobs, registerJob } from "@/features/shared/server/jobs";
import type { z } from "zod";
import {
  concentrationFromGrams,
  concentrationFromMl,
  doseMlForTarget,
  gramsForTarget,
  doseWarnings,
  DosingInputError,
  readStrength,
  type ConcentrationUnit,
  type DoseWarning,
  type DoseWarningCode,
  type GuardEvidence,
  type StockBasis,
} from "@/features/dosing";
import type { CourseEntryPatch, courseEntrySchema } from "../schemas";
import { canSeeReport, getReportRowById } from "./queries";
import type { ReportRow } from "./mapping";
import { lockEditable, recordEvent, saveDerived } from "./mutations";

const { reports, courseEntries, reminders, agents, users } = schema;
const HOUR = 3600_000;

type Tx = Parameters<Parameters<Awaited<ReturnType<typeof getDb>>["transaction"]>[0]>[0];
type EntryRow = typeof courseEntries.$inferSelect;

/** The keeper's own open course, or the right error (404 hides others' reports). Authorization lives here. */
async function ownOpenCourse(actor: Actor | null, reportId: string, what: string): Promise<ReportRow> {
  if (!actor) throw new AppError("unauthenticated", "Sign in to log a treatment course.");
  const row = await getReportRowById(reportId);
  if (!row || !canSeeReport(actor, row)) throw notFound("That report");
  if (row.authorId !== actor.id)
    throw new AppError("forbidden", `Only the member who keeps a course may ${what} in it.`);
  if (row.status !== "draft") throw new AppError("conflict", "This course has been submitted; its log is closed.");
  return row;
}

/** mg of active per mL of the report's stock, read the one shared way (readStrength); null when it cannot be read. */
async function courseStock(db: Awaited<ReturnType<typeof getDb>>, row: ReportRow) {
  const [agent] = row.agentSlug ? await db.select().from(agents).where(eq(agents.slug, row.agentSlug)) : [];
  const [preset] = row.stockFormId
    ? await db.select().from(schema.stockForms).where(eq(schema.stockForms.id, row.stockFormId))
    : [];
  let mgPerMl: number | null = null;
  try {
    if (row.stockPercent != null || preset) {
      mgPerMl = readStrength({
        percent: row.stockPercent ?? undefined,
        basis: (row.stockBasis ?? undefined) as StockBasis | undefined,
        densityGPerMl: row.stockDensityGPerMl,
        preset: preset ?? null,
      }).mgPerMl;
    }
  } catch (err) {
    if (!(err instanceof DosingInputError)) throw err;
  }
  return { agent: agent ?? null, mgPerMl, unit: (agent?.unit ?? "mg/L") as ConcentrationUnit };
}

/** One dose as given: mL of the course's stock, or grams of dry salt (treatments dosed in g/L). */
type DoseAmount = { ml: number; grams?: undefined } | { grams: number; ml?: undefined };
const amountOf = (e: { amountMl: number | null; amountGrams: number | null }): DoseAmount | null =>
  e.amountGrams != null ? { grams: e.amountGrams } : e.amountMl != null ? { ml: e.amountMl } : null;
const amountText = (a: DoseAmount | null) => (a?.grams != null ? `${a.grams} g of dry salt` : `${a?.ml} mL`);

/** What turns an amount into a concentration: the course's water, the stock's strength and the agent's unit. */
interface CourseWater {
  volumeL: number | null;
  mgPerMl: number | null;
  unit: ConcentrationUnit;
}

/** The concentration (agent's unit) a dose makes in the course's water, by the shared dosing functions; null if unknown. */
function concentrationOfAmount(a: DoseAmount, w: CourseWater): number | null {
  if (!w.volumeL) return null;
  if (a.grams != null) return concentrationFromGrams(a.grams, w.volumeL, w.unit);
  return w.mgPerMl ? concentrationFromMl(a.ml, w.volumeL, w.mgPerMl, w.unit) : null;
}

/** Whether dose a makes more than dose b: by concentration, or by the same unit where the water is not known. */
function exceeds(a: DoseAmount, b: DoseAmount, w: CourseWater): boolean {
  const ca = concentrationOfAmount(a, w);
  const cb = concentrationOfAmount(b, w);
  if (ca != null && cb != null) return ca > cb;
  if (a.ml != null && b.ml != null) return a.ml > b.ml;
  if (a.grams != null && b.grams != null) return a.grams > b.grams;
  return false;
}

const liveDoses = (entries: EntryRow[]) =>
  entries
    .filter((e) => e.kind === "dose" && !e.struckAt && (e.amountMl != null || e.amountGrams != null))
    .sort((a, b) => a.at.getTime() - b.at.getTime() || a.id - b.id);

/**
 * The planned single dose, in mL of the stock and in grams of dry salt (each null where it cannot be known): the
 * report's stated concentration turned into an amount, else the first dose logged (other than `except`), else the
 * amount the course was opened with; the other unit follows through the concentration that amount makes.
 */
function plannedDose(
  row: ReportRow,
  w: CourseWater,
  entries: EntryRow[],
  except?: number,
): { ml: number | null; grams: number | null } {
  const doses = liveDoses(entries);
  const first = doses.find((e) => e.id !== except);
  const given = first ? amountOf(first) : doses.length === 0 && row.amountMl != null ? { ml: row.amountMl } : null;
  const stated = row.statedConcentration != null && w.volumeL ? row.statedConcentration : null;
  const target = stated ?? (given ? concentrationOfAmount(given, w) : null);
  const mlFor = (c: number | null) =>
    c != null && w.volumeL && w.mgPerMl ? doseMlForTarget(c, w.volumeL, w.mgPerMl, w.unit) : null;
  const gramsFor = (c: number | null) =>
    c != null && w.volumeL && w.unit === "g/L" ? gramsForTarget(c, w.volumeL, w.unit) : null;
  return {
    ml: mlFor(stated) ?? given?.ml ?? mlFor(target),
    grams: gramsFor(stated) ?? given?.grams ?? gramsFor(target),
  };
}

/**
 * An entry dated before the course began (a day's grace for time zones) is a slip of the date: it would count as
 * the first dose, set the plan the 3× check compares with, and make a reminder due at once.
 */
function refuseBeforeStart(row: ReportRow, at: Date): void {
  if (!row.startedOn) return;
  if (at.getTime() < Date.parse(`${row.startedOn}T00:00:00Z`) - 86_400_000)
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      {
        path: "at",
        message: `This time is before the course started (${formatDay(`${row.startedOn}T12:00:00Z`)}); check the date.`,
      },
    ]);
}

const CONFIRM_HINT = "send confirm: true if it is right.";

/** Reads a group's evidence for an agent; the evidence feature (above this one) supplies it through the route. */
export type CourseEvidenceLoader = (groupSlug: string, agentSlug: string) => Promise<GuardEvidence | null>;
export interface CourseOptions {
  loadEvidence?: CourseEvidenceLoader;
}

/** The guard rails that judge one dose (the evidence-only notes such as sparse_evidence are the planner's to show). */
const doseRailCodes: readonly DoseWarningCode[] = [
  "above_ceiling",
  "at_or_above_lowest_adverse",
  "above_highest_tolerated",
  "above_bmdl",
];

/**
 * The shared guard rails for a logged dose: the concentration its mL make in the course's water, against the agent's
 * plausible ceiling and the group's evidence, exactly as the planner judges a planned dose.
 */
async function courseRails(db: Awaited<ReturnType<typeof getDb>>, row: ReportRow, options: CourseOptions) {
  const { agent, mgPerMl, unit } = await courseStock(db, row);
  const evidence =
    agent && row.groupSlug && options.loadEvidence ? await options.loadEvidence(row.groupSlug, agent.slug) : undefined;
  return (amount: DoseAmount, label = "this dose"): DoseWarning[] => {
    const concentration = agent ? concentrationOfAmount(amount, { volumeL: row.volumeL, mgPerMl, unit }) : null;
    if (!agent || concentration == null) return [];
    return doseWarnings({ unit, ceiling: agent.plausibleCeiling, doses: [{ label, concentration }], evidence }).filter(
      (w) => doseRailCodes.includes(w.code),
    );
  };
}

/** The 422 issues that ask the keeper to acknowledge each warning before the dose is logged. */
const railIssues = (warnings: DoseWarning[], path: string) =>
  warnings.map((w) => ({
    path,
    code: w.code,
    message: `${w.message} If you have read this and it is right, ${CONFIRM_HINT}`,
  }));
const acknowledgedNote = (warnings: DoseWarning[]) =>
  warnings.length
    ? `; warnings acknowledged: ${warnings.map((w) => railWords[w.code] ?? w.code.replaceAll("_", " ")).join(", ")}`
    : "";

/** The guard rails as the history reads them (no code or abbreviation on a page). */
const railWords: Partial<Record<string, string>> = {
  at_or_above_lowest_adverse: "at or above the lowest dose that went badly",
  above_highest_tolerated: "above the highest dose tolerated",
  above_bmdl: "above the fitted curve's lower limit",
  above_ceiling: "above the plausible ceiling",
};
function amountNeedsConfirm(a: DoseAmount, planned: { ml: number | null; grams: number | null }): string | null {
  const [given, plan, u] = a.grams != null ? [a.grams, planned.grams, "g"] : [a.ml, planned.ml, "mL"];
  if (plan == null || !(given > 3 * plan)) return null;
  return `${fmt(given)} ${u} is more than 3× the planned dose of ${fmt(plan)} ${u}: check for a typo, or ${CONFIRM_HINT}`;
}
const amountPath = (a: DoseAmount) => (a.grams != null ? "amountGrams" : "amountMl");

/** Grams of dry salt only make sense for a treatment dosed in g/L; anything else is measured as a solution in mL. */
function refuseGramsUnlessSalt(unit: ConcentrationUnit, grams: number | undefined): void {
  if (grams !== undefined && unit !== "g/L")
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      {
        path: "amountGrams",
        message:
          "Grams of dry salt are for a treatment dosed in g/L (salt); give the mL of the solution (amountMl) for this one.",
      },
    ]);
}
const fmt = (n: number) => (Math.round(n * 100) / 100).toString();

/** The report follows its log: number of doses and peak single dose (struck entries left out); reminders follow the last dose. */
async function syncFromLog(tx: Tx, row: ReportRow, userId: string): Promise<void> {
  const all = await tx.select().from(courseEntries).where(eq(courseEntries.reportId, row.id));
  const doses = liveDoses(all);
  // The report's amount is in mL of the stock; doses weighed dry count as doses but have no mL.
  const peak = doses.reduce<number | null>(
    (m, e) => (e.amountMl != null && (m == null || e.amountMl > m) ? e.amountMl : m),
    null,
  );
  await tx
    .update(reports)
    .set({ doses: doses.length || null, amountMl: peak, courseOpen: true, updatedAt: new Date() })
    .where(eq(reports.id, row.id));
  await saveDerived(tx, row.id);
  await tx.delete(reminders).where(and(eq(reminders.reportId, row.id), isNull(reminders.sentAt)));
  const last = doses.at(-1);
  if (!last) return;
  const [agent] = row.agentSlug ? await tx.select().from(agents).where(eq(agents.slug, row.agentSlug)) : [];
  const interval = row.intervalHours ?? agent?.redoseHours ?? null;
  if (interval)
    await tx
      .insert(reminders)
      .values({ reportId: row.id, userId, kind: "next_dose", dueAt: new Date(last.at.getTime() + interval * HOUR) });
  await tx.insert(reminders).values({
    reportId: row.id,
    userId,
    kind: "outcome",
    dueAt: new Date(last.at.getTime() + (agent?.watchDays ?? 7) * 24 * HOUR),
  });
}

const entryOut = (e: EntryRow) => ({
  id: e.id,
  kind: e.kind,
  at: e.at.toISOString(),
  amountMl: e.amountMl,
  amountGrams: e.amountGrams,
  text: e.text,
  photoId: e.photoId,
  struckAt: e.struckAt?.toISOString() ?? null,
});
const when = (d: Date) => d.toISOString().slice(0, 16).replace("T", " ") + " UTC";
const describe = (e: { kind: string; amountMl: number | null; amountGrams: number | null; text: string | null }) =>
  e.kind === "dose" ? `dose of ${amountText(amountOf(e))}` : `"${e.text ?? ""}"`;

/** The member logs a dose or an observation on an open course; due reminders are (re)scheduled. */
export async function addCourseEntry(
  actor: Actor | null,
  reportId: string,
  entry: z.infer<typeof courseEntrySchema>,
  options: CourseOptions = {},
) {
  const row = await ownOpenCourse(actor, reportId, "log");
  const db = await getDb();
  const at = new Date(entry.at);
  refuseBeforeStart(row, at);
  if (entry.photoId) {
    const [photo] = await db
      .select({ reportId: schema.photos.reportId })
      .from(schema.photos)
      .where(eq(schema.photos.id, entry.photoId));
    if (photo?.reportId !== reportId)
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        { path: "photoId", message: "That photo does not belong to this report; upload it to the report first." },
      ]);
  }
  const { mgPerMl, unit } = await courseStock(db, row);
  const amount =
    entry.kind === "dose"
      ? amountOf({ amountMl: entry.amountMl ?? null, amountGrams: entry.amountGrams ?? null })
      : null;
  if (amount) refuseGramsUnlessSalt(unit, amount.grams);
  const warnings = amount ? (await courseRails(db, row, options))(amount) : [];
  if (amount && !entry.confirm) {
    const existing = await db.select().from(courseEntries).where(eq(courseEntries.reportId, reportId));
    const problem = amountNeedsConfirm(amount, plannedDose(row, { volumeL: row.volumeL, mgPerMl, unit }, existing));
    const path = amountPath(amount);
    const issues = [...(problem ? [{ path, message: problem }] : []), ...railIssues(warnings, path)];
    if (issues.length) throw new AppError("invalid", "Please confirm this entry; see issues.", issues);
  }
  return db.transaction(async (tx) => {
    await lockEditable(
      tx,
      reportId,
      ["draft"],
      "This course was submitted while you were logging, so nothing was added; its log is closed.",
    );
    const [saved] = await tx
      .insert(courseEntries)
      .values({
        reportId,
        kind: entry.kind,
        at,
        amountMl: amount?.ml ?? null,
        amountGrams: amount?.grams ?? null,
        text: entry.text ?? null,
        photoId: entry.photoId ?? null,
      })
      .returning();
    if (entry.kind === "dose") {
      await syncFromLog(tx, row, actor!.id);
      await recordEvent(tx, {
        reportId,
        actorId: actor!.id,
        action: "dose_logged",
        from: "draft",
        to: "draft",
        note: `${amountText(amount)}${acknowledgedNote(warnings)}`,
      });
    }
    return entryOut(saved!);
  });
}

/**
 * The keeper corrects an entry (amount, time, text) or strikes it out. Nothing is deleted: the old values go
 * into the report's history, and a struck entry stays in the log, crossed out. Unusual values need `confirm`.
 */
export async function correctCourseEntry(
  actor: Actor | null,
  reportId: string,
  entryId: string,
  patch: CourseEntryPatch,
  options: CourseOptions = {},
) {
  const row = await ownOpenCourse(actor, reportId, "correct entries");
  const db = await getDb();
  if (patch.at !== undefined) refuseBeforeStart(row, new Date(patch.at));
  const id = /^[1-9][0-9]{0,9}$/.test(entryId) ? Number(entryId) : NaN;
  const all = await db.select().from(courseEntries).where(eq(courseEntries.reportId, reportId));
  const entry = all.find((e) => e.id === id);
  if (!entry) throw notFound("That course entry");
  if (entry.struckAt) throw new AppError("conflict", "This entry is struck out; log a new entry instead.");
  const amount = amountOf({ amountMl: patch.amountMl ?? null, amountGrams: patch.amountGrams ?? null });
  if (amount && entry.kind !== "dose") {
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      { path: amountPath(amount), message: "An observation has no amount; correct its text or time." },
    ]);
  }
  const { mgPerMl, unit } = await courseStock(db, row);
  if (amount) refuseGramsUnlessSalt(unit, amount.grams);
  if (entry.kind === "observation" && patch.text !== undefined && !patch.text) {
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      { path: "text", message: "Describe what you saw, or strike the observation out." },
    ]);
  }
  const warnings = amount && !patch.struck ? (await courseRails(db, row, options))(amount, "the corrected dose") : [];
  if (amount && !patch.confirm) {
    const problem = amountNeedsConfirm(
      amount,
      plannedDose(row, { volumeL: row.volumeL, mgPerMl, unit }, all, entry.id),
    );
    const path = amountPath(amount);
    const issues = [...(problem ? [{ path, message: problem }] : []), ...railIssues(warnings, path)];
    if (issues.length) throw new AppError("invalid", "Please confirm this correction; see issues.", issues);
  }
  return db.transaction(async (tx) => {
    await lockEditable(
      tx,
      reportId,
      ["draft"],
      "This course was submitted while you were logging, so nothing was changed; its log is closed.",
    );
    let note: string;
    let saved: EntryRow | undefined;
    if (patch.struck) {
      [saved] = await tx
        .update(courseEntries)
        .set({ struckAt: new Date() })
        .where(and(eq(courseEntries.id, entry.id), isNull(courseEntries.struckAt)))
        .returning();
      note = `struck out the ${describe(entry)} of ${when(entry.at)}`;
    } else {
      const next = {
        at: patch.at ? new Date(patch.at) : entry.at,
        // A corrected amount replaces the old one in whichever unit it is given (mL of stock or grams of dry salt).
        amountMl: amount ? (amount.ml ?? null) : entry.amountMl,
        amountGrams: amount ? (amount.grams ?? null) : entry.amountGrams,
        text: patch.text !== undefined ? patch.text || null : entry.text,
      };
      [saved] = await tx
        .update(courseEntries)
        .set(next)
        .where(and(eq(courseEntries.id, entry.id), isNull(courseEntries.struckAt)))
        .returning();
      const changes = [
        next.amountMl !== entry.amountMl || next.amountGrams !== entry.amountGrams
          ? `amount ${amountText(amountOf(entry))} → ${amountText(amountOf(next))}`
          : null,
        next.at.getTime() !== entry.at.getTime() ? `time ${when(entry.at)} → ${when(next.at)}` : null,
        next.text !== entry.text ? `text "${entry.text ?? ""}" → "${next.text ?? ""}"` : null,
      ].filter(Boolean);
      note = `corrected the ${entry.kind} of ${when(entry.at)}: ${changes.join("; ") || "no change"}${acknowledgedNote(warnings)}`;
    }
    if (!saved) throw new AppError("conflict", "This entry was struck out meanwhile; reload the log.");
    if (entry.kind === "dose") await syncFromLog(tx, row, actor!.id);
    await recordEvent(tx, {
      reportId,
      actorId: actor!.id,
      action: patch.struck ? "entry_struck" : "entry_corrected",
      from: "draft",
      to: "draft",
      note: patch.note ? `${note} — ${patch.note}` : note,
    });
    return entryOut(saved);
  });
}

/**
 * What the open course's page shows: each entry with the concentration a dose made, the next dose due (time, mL and
 * the concentration it makes, from the shared dosing functions) and what to watch for.
 */
export async function getCourse(actor: Actor | null, reportId: string, options: CourseOptions = {}) {
  const row = await getReportRowById(reportId);
  if (!row || !canSeeReport(actor, row)) throw notFound("That report");
  const db = await getDb();
  const { agent, mgPerMl, unit } = await courseStock(db, row);
  const rails = await courseRails(db, row, options);
  const all = await db
    .select()
    .from(courseEntries)
    .where(eq(courseEntries.reportId, reportId))
    .orderBy(asc(courseEntries.at), asc(courseEntries.id));
  const figures = courseFigures(row, agent, mgPerMl, unit, all);
  const water = { volumeL: row.volumeL, mgPerMl, unit };
  const next = figures.nextDose;
  const nextAmount: DoseAmount | null =
    next?.doseGrams != null ? { grams: next.doseGrams } : next?.doseMl != null ? { ml: next.doseMl } : null;
  return {
    ...figures,
    // The next dose is judged like any planned dose, so the keeper sees the warning before giving it.
    nextDoseWarnings: nextAmount ? rails(nextAmount, "the next dose") : [],
    entries: all.map((e) => {
      const amount = e.kind === "dose" ? amountOf(e) : null;
      const concentration = amount ? concentrationOfAmount(amount, water) : null;
      return {
        ...entryOut(e),
        concentration,
        // For salt (g/L): the grams of salt the dose holds, whether weighed dry or poured as brine.
        activeGrams:
          amount?.grams ??
          (concentration != null && unit === "g/L" && row.volumeL
            ? gramsForTarget(concentration, row.volumeL, unit)
            : null),
        warnings: amount && !e.struckAt ? rails(amount) : [],
      };
    }),
  };
}

/** The next dose of each of these open courses (for the member's home); one small read per course. */
export async function nextDosesOf(rows: ReportRow[]) {
  const db = await getDb();
  return Promise.all(
    rows.map(async (row) => {
      const { agent, mgPerMl, unit } = await courseStock(db, row);
      const all = await db.select().from(courseEntries).where(eq(courseEntries.reportId, row.id));
      return { reportId: row.id, ...courseFigures(row, agent, mgPerMl, unit, all) };
    }),
  );
}

function courseFigures(
  row: ReportRow,
  agent: typeof agents.$inferSelect | null,
  mgPerMl: number | null,
  unit: ConcentrationUnit,
  all: EntryRow[],
) {
  const doses = liveDoses(all);
  const last = doses.at(-1);
  const interval = row.intervalHours ?? agent?.redoseHours ?? null;
  const water = { volumeL: row.volumeL, mgPerMl, unit };
  const planned = plannedDose(row, water, all);
  // Salt with no stock named is weighed dry: the log then asks for grams, and the next dose is given in grams.
  const weighedDry = unit === "g/L" && !mgPerMl;
  const open = row.status === "draft" && row.courseOpen;
  // Before the first dose, the planned dose is due now.
  const plannedAmount: DoseAmount | null =
    weighedDry && planned.grams != null
      ? { grams: planned.grams }
      : planned.ml != null
        ? { ml: planned.ml }
        : planned.grams != null
          ? { grams: planned.grams }
          : null;
  // The next dose repeats the last one given, but never more than the plan: a dose confirmed above the plan
  // (a slip of the measure, or a keeper pushing on) is logged as it was, not scheduled again.
  const lastAmount = last ? amountOf(last) : null;
  const nextAmount =
    lastAmount && plannedAmount && exceeds(lastAmount, plannedAmount, water)
      ? plannedAmount
      : (lastAmount ?? plannedAmount);
  const nextAt = last ? (interval ? new Date(last.at.getTime() + interval * HOUR) : null) : new Date();
  const nextDose =
    open && nextAt && nextAmount
      ? {
          at: nextAt.toISOString(),
          /** mL of the stock; null when the dose is weighed as dry salt (then doseGrams). */
          doseMl: nextAmount.ml ?? null,
          doseGrams: nextAmount.grams ?? null,
          concentration: concentrationOfAmount(nextAmount, water),
          unit,
          first: !last,
        }
      : null;
  const watchDays = agent?.watchDays ?? 7;
  const watchFor = [
    "For the first hour after each dose: fish gasping at the surface, fast gill movement, clamped fins, loss of balance or colour. If you see them, do a large, temperature-matched water change at once.",
    `Keep watching for ${watchDays} days after the last dose, and record the outcome then.`,
    "Never add a dose because the last one seemed to do nothing; if fish get worse, ask an aquatic vet.",
  ];
  return {
    open,
    unit,
    volumeL: row.volumeL,
    stockMgPerMl: mgPerMl,
    intervalHours: interval,
    plannedDoseMl: planned.ml,
    plannedDoseGrams: planned.grams,
    /** Grams of dry salt can be logged (the treatment is dosed in g/L). */
    gramsAllowed: unit === "g/L",
    weighedDry,
    nextDose,
    watchFor,
    watchUntil: last ? new Date(last.at.getTime() + watchDays * 24 * HOUR).toISOString() : null,
  };
}

const reminderText = {
  next_dose: {
    subject: "Next dose due",
    lead: "By the interval you chose, the next dose of your treatment course is due now.",
  },
  outcome: {
    subject: "Time to record the outcome",
    lead: "Your watching period after the last dose is over: record how the course ended.",
  },
} as const;

/**
 * Queues the mails of reminders that have fallen due. Each reminder is claimed (sent_at set) and its mail
 * queued in one transaction, so two processes never queue one twice and a crash loses none; the mail job
 * then retries until the mail server takes it. Returns how many were queued (and sends them before returning).
 */
export async function runDueReminders(now = new Date()): Promise<number> {
  const db = await getDb();
  const due = await db
    .select({
      id: reminders.id,
      kind: reminders.kind,
      reportId: reminders.reportId,
      email: users.email,
      name: users.name,
      status: reports.status,
    })
    .from(reminders)
    .innerJoin(users, eq(users.id, reminders.userId))
    .innerJoin(reports, eq(reports.id, reminders.reportId))
    .where(and(isNull(reminders.sentAt), lte(reminders.dueAt, now)))
    .limit(50);
  let queued = 0;
  for (const r of due) {
    const t = reminderText[r.kind as keyof typeof reminderText] ?? reminderText.outcome;
    const took = await db.transaction(async (tx) => {
      const [claimed] = await tx
        .update(reminders)
        .set({ sentAt: now })
        .where(and(eq(reminders.id, r.id), isNull(reminders.sentAt)))
        .returning({ id: reminders.id });
      if (!claimed || r.status !== "draft") return false;
      await queueMail(
        {
          to: r.email,
          subject: `Tanklore: ${t.subject}`,
          text: `Hello ${r.name},\n\n${t.lead}\n\nOpen your course log: ${publicBaseUrl()}/reports/${r.reportId}\n\nWatch the fish closely after every dose, and be ready for a large, temperature-matched water change.\n\n— Tanklore`,
        },
        tx,
      );
      return true;
    });
    if (took) queued += 1;
  }
  if (queued) await kickJobs(["mail"]);
  return queued;
}

/** The reminder round runs every minute in whichever process claims it (features/shared/server/jobs.ts). */
registerJob("reminders", {
  everyMs: 60_000,
  run: async (_payload, { now }) => {
    await runDueReminders(now);
  },
});

/** Kept for callers of the old per-process timer: the job runner now runs the round. */
export function startReminderScheduler(): void {}
