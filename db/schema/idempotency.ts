import { integer, jsonb, pgTable, primaryKey, text, timestamp } from "drizzle-orm/pg-core";
import { users } from "./auth";

/**
 * Idempotency-Key of a creating request: the first response, kept 24 h, so a client's retry gets it again.
 * Written in the creating transaction, so a stored key always has its creation and the other way round.
 */
export const idempotencyKeys = pgTable(
  "idempotency_keys",
  {
    memberId: text()
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    key: text().notNull(),
    /** Hash of method, path and the request's content: the same key with another request is refused. */
    requestHash: text().notNull(),
    status: integer().notNull(),
    body: jsonb(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.memberId, t.key] })],
);
