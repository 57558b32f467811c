import {
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgTable,
  primaryKey,
  serial,
  text,
  timestamp,
} from "drizzle-orm/pg-core";
import { users } from "./auth";
import { agents, conditions, species, speciesGroups } from "./catalogue";

export const reportStatuses = ["draft", "awaiting_review", "accepted", "returned", "declined", "retracted"] as const;
export type ReportStatus = (typeof reportStatuses)[number];

/**
 * One treatment course in one tank. Drafts may be incomplete, so most fields are nullable;
 * the submit rules (features/reports/schemas.ts) decide what a complete report needs.
 */
export const reports = pgTable(
  "reports",
  {
    id: text().primaryKey(),
    authorId: text()
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    status: text().$type<ReportStatus>().notNull().default("draft"),
    /** "member" (filed here), "import" (CSV) or "demo" (invented demo data). */
    source: text().notNull().default("member"),
    /** For imported reports: the pseudonymous reporter of the file, so members are still counted apart. */
    externalReporter: text(),
    /** For imported reports: a hash of the normalised fields and reporter, so a file without ids imports once. */
    fingerprint: text(),

    speciesId: text().references(() => species.id, { onUpdate: "cascade" }),
    speciesOther: text(),
    /** The species' group when the report was filed or mapped; what summaries group by. */
    groupSlug: text().references(() => speciesGroups.slug, { onUpdate: "cascade" }),
    fishCount: integer(),
    sizeClass: text(),
    conditionSlug: text().references(() => conditions.slug, { onUpdate: "cascade" }),
    startedOn: date({ mode: "string" }),

    waterVolume: doublePrecision(),
    waterVolumeUnit: text(),
    /** Computed from volume and unit. */
    volumeL: doublePrecision(),
    temperature: doublePrecision(),
    temperatureUnit: text(),
    temperatureC: doublePrecision(),
    ph: doublePrecision(),
    setting: text(),

    agentSlug: text().references(() => agents.slug, { onUpdate: "cascade" }),
    /** The catalogue stock form the reporter named, if any: only a named form's active fraction applies. */
    stockFormId: text(),
    stockPercent: doublePrecision(),
    stockBasis: text(),
    stockDensityGPerMl: doublePrecision(),
    stockActiveFraction: doublePrecision(),
    amountMl: doublePrecision(),
    statedConcentration: doublePrecision(),
    doses: integer(),
    intervalHours: doublePrecision(),
    otherTreatments: text(),

    fishLost: integer(),
    lossCause: text(),
    distress: text(),
    conditionOutcome: text(),
    observedDaysAfter: integer(),
    notes: text(),
    showName: boolean().notNull().default(false),

    /** Peak single-dose concentration in the agent's unit, computed by the server. */
    concentration: doublePrecision(),
    /** Plausibility flags computed at submission: [{ code, message }]. */
    flags: jsonb().$type<{ code: string; message: string }[]>().notNull().default([]),
    completeness: doublePrecision(),
    /** A course still being logged (doses and observations), outcome not yet known. */
    courseOpen: boolean().notNull().default(false),

    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    submittedAt: timestamp({ withTimezone: true }),
    decidedAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    index("reports_author_idx").on(t.authorId),
    index("reports_status_idx").on(t.status),
    index("reports_evidence_idx").on(t.agentSlug, t.groupSlug, t.status),
    index("reports_fingerprint_idx").on(t.fingerprint),
  ],
);

/** The audit trail: every transition and correction. Append-only; no code path updates or deletes it. */
export const reportEvents = pgTable(
  "report_events",
  {
    id: serial().primaryKey(),
    reportId: text()
      .notNull()
      .references(() => reports.id, { onDelete: "cascade" }),
    actorId: text().references(() => users.id, { onDelete: "set null" }),
    /** Who acted, as an imported file named them (a pseudonym), when the actor is no member here. */
    actorName: text(),
    action: text().notNull(),
    fromStatus: text(),
    toStatus: text(),
    note: text(),
    at: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("report_events_report_idx").on(t.reportId)],
);

/** Entries of an open course: doses given and observations made, each with its time. */
export const courseEntries = pgTable(
  "course_entries",
  {
    id: serial().primaryKey(),
    reportId: text()
      .notNull()
      .references(() => reports.id, { onDelete: "cascade" }),
    kind: text().$type<"dose" | "observation">().notNull(),
    at: timestamp({ withTimezone: true }).notNull(),
    amountMl: doublePrecision(),
    /** A dose of dry salt weighed in grams instead of mL of a solution; a dose holds exactly one of the two. */
    amountGrams: doublePrecision(),
    text: text(),
    photoId: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** Struck out by the keeper: kept and shown crossed out, never deleted; no longer counts as a dose. */
    struckAt: timestamp({ withTimezone: true }),
  },
  (t) => [index("course_entries_report_idx").on(t.reportId)],
);

/** Due reminders (next dose, next check); kept in the database so they survive restarts. */
export const reminders = pgTable(
  "reminders",
  {
    id: serial().primaryKey(),
    reportId: text()
      .notNull()
      .references(() => reports.id, { onDelete: "cascade" }),
    userId: text()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    kind: text().notNull(),
    dueAt: timestamp({ withTimezone: true }).notNull(),
    sentAt: timestamp({ withTimezone: true }),
  },
  (t) => [index("reminders_due_idx").on(t.dueAt)],
);

export const photos = pgTable(
  "photos",
  {
    id: text().primaryKey(),
    reportId: text()
      .notNull()
      .references(() => reports.id, { onDelete: "cascade" }),
    uploaderId: text().references(() => users.id, { onDelete: "set null" }),
    stage: text().notNull().default("during"),
    width: integer().notNull(),
    height: integer().notNull(),
    bytes: integer().notNull(),
    fullKey: text().notNull(),
    thumbKey: text().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("photos_report_idx").on(t.reportId)],
);

/** When each moderator last got the digest of reports awaiting review (at most one an hour). */
export const moderatorDigests = pgTable("moderator_digests", {
  userId: text()
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  lastSentAt: timestamp({ withTimezone: true }).notNull(),
  /** Submissions up to this time have been included in a digest. */
  coveredUntil: timestamp({ withTimezone: true }).notNull(),
  /** A process sending this moderator's digest holds it until then (a crashed send frees it when it passes). */
  claimedUntil: timestamp({ withTimezone: true }),
});

/**
 * Published summaries: one row per species group × agent × condition ("" = every condition),
 * recomputed when an accept, retract, correction, import or settings change touches it.
 */
export const evidenceSummaries = pgTable(
  "evidence_summaries",
  {
    groupSlug: text().notNull(),
    agentSlug: text().notNull(),
    conditionSlug: text().notNull().default(""),
    methodVersion: text().notNull(),
    confidenceLevel: integer().notNull(),
    reports: integer().notNull(),
    /** The list figures (what GET /api/summaries returns per group). */
    summary: jsonb().notNull(),
    /** The group page's extra: bands, anonymous points, contributing species. */
    detail: jsonb().notNull(),
    computedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.agentSlug, t.conditionSlug, t.groupSlug] })],
);

/**
 * Group × agent pairs whose summaries a committed change made stale, written in the same transaction
 * as the change; the evidence worker recomputes each pair and deletes its rows in one transaction.
 */
export const evidenceOutbox = pgTable(
  "evidence_outbox",
  {
    id: serial().primaryKey(),
    groupSlug: text().notNull(),
    agentSlug: text().notNull(),
    enqueuedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("evidence_outbox_pair_idx").on(t.groupSlug, t.agentSlug)],
);
