import { index, integer, jsonb, pgTable, text, timestamp, uniqueIndex } from "drizzle-orm/pg-core";

/**
 * Background work claimed in the database (features/shared/server/jobs.ts): notice mails, reminder and digest
 * rounds, nightly backups and failed evidence recomputes. Any process may claim a due row with
 * FOR UPDATE SKIP LOCKED, so each runs once across processes; a claim is a lease, so work a crashed process held
 * is taken again when it runs out. Failed rows stay for admins to read (GET /api/admin/jobs).
 */
export const jobs = pgTable(
  "jobs",
  {
    id: text().primaryKey(),
    kind: text().notNull(),
    /** Set for work that must exist once (a round's time slot, a night): a second enqueue is a no-op. */
    dedupeKey: text(),
    payload: jsonb().notNull().default({}),
    /** queued | running | done | failed */
    status: text().notNull().default("queued"),
    attempts: integer().notNull().default(0),
    maxAttempts: integer().notNull().default(5),
    runAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    lockedBy: text(),
    lockedUntil: timestamp({ withTimezone: true }),
    lastError: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("jobs_dedupe_key_idx").on(t.dedupeKey), index("jobs_due_idx").on(t.status, t.runAt)],
);
