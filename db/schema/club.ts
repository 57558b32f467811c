import { sql } from "drizzle-orm";
import { boolean, check, doublePrecision, integer, jsonb, pgTable, serial, text, timestamp } from "drizzle-orm/pg-core";
import { users } from "./auth";

/** One row (id = 1): the club's own settings, edited by admins. */
export const clubSettings = pgTable(
  "club_settings",
  {
    id: integer().primaryKey().default(1),
    name: text().notNull().default("Tanklore club"),
    confidenceLevel: integer().notNull().default(95),
    minReports: integer().notNull().default(5),
    defaultVolumeUnit: text().notNull().default("L"),
    defaultTemperatureUnit: text().notNull().default("C"),
    /** The share of a group's usual dose the planner offers as a first dose: ½, or ⅓ for a cautious club. */
    firstDoseFraction: doublePrecision().notNull().default(0.5),
    // The nightly backup into DATA_DIR/backups; off until an admin turns it on.
    nightlyBackup: boolean().notNull().default(false),
    // When the last nightly backup was claimed: kept here, not in memory, so a restart never runs one twice.
    lastNightlyBackupAt: timestamp({ withTimezone: true }),
    updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check("club_settings_single_row", sql`${t.id} = 1`),
    check("club_settings_confidence", sql`${t.confidenceLevel} in (80, 90, 95, 99)`),
  ],
);

/** Every change of a member's role: who changed it, from what, to what. Append-only. */
export const roleChanges = pgTable("role_changes", {
  id: serial().primaryKey(),
  userId: text()
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  actorId: text().references(() => users.id, { onDelete: "set null" }),
  fromRole: text().notNull(),
  toRole: text().notNull(),
  at: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

/** Every catalogue or settings change: entity, key, before and after. Append-only. */
export const catalogueChanges = pgTable("catalogue_changes", {
  id: serial().primaryKey(),
  actorId: text().references(() => users.id, { onDelete: "set null" }),
  entity: text().notNull(),
  entityKey: text().notNull(),
  action: text().notNull(),
  before: jsonb(),
  after: jsonb(),
  at: timestamp({ withTimezone: true }).notNull().defaultNow(),
});
