import { boolean, doublePrecision, index, integer, jsonb, pgTable, text } from "drizzle-orm/pg-core";

export const speciesGroups = pgTable("species_groups", {
  slug: text().primaryKey(),
  name: text().notNull(),
  description: text().notNull().default(""),
  sortOrder: integer().notNull().default(0),
  hidden: boolean().notNull().default(false),
});

export const species = pgTable(
  "species",
  {
    id: text().primaryKey(),
    scientificName: text().notNull().unique(),
    commonName: text().notNull(),
    groupSlug: text()
      .notNull()
      .references(() => speciesGroups.slug, { onUpdate: "cascade" }),
    hidden: boolean().notNull().default(false),
    /** When merged into another species, reports are read as that one. */
    mergedInto: text(),
  },
  (t) => [index("species_group_idx").on(t.groupSlug)],
);

export const agents = pgTable("agents", {
  slug: text().primaryKey(),
  name: text().notNull(),
  /** "mg/L" for most agents; "g/L" for salt. */
  unit: text().notNull(),
  /** Ascending edges of the dose bands [from, to) in the agent's unit. */
  bandEdges: jsonb().$type<number[]>().notNull(),
  /** Doses above this are flagged as implausible. */
  plausibleCeiling: doublePrecision().notNull(),
  /** Common-practice redosing interval, for the planner's checklist; null where none is usual. */
  redoseHours: integer(),
  /** Common-practice days of watching after the last dose. */
  watchDays: integer().notNull().default(7),
  description: text().notNull().default(""),
  sortOrder: integer().notNull().default(0),
  hidden: boolean().notNull().default(false),
});

export const stockForms = pgTable(
  "stock_forms",
  {
    id: text().primaryKey(),
    agentSlug: text()
      .notNull()
      .references(() => agents.slug, { onUpdate: "cascade" }),
    label: text().notNull(),
    percent: doublePrecision().notNull(),
    basis: text().$type<"w/v" | "w/w">().notNull(),
    /** g/mL of the solution; needed to turn % w/w into mg/mL. */
    densityGPerMl: doublePrecision(),
    /** Share of the dissolved compound's mass that is the dosed active (e.g. Cu²⁺ in CuSO₄·5H₂O); 1 when the same. */
    activeFraction: doublePrecision().notNull().default(1),
    /** What the percentage is of when that is a compound (e.g. copper sulfate pentahydrate); null: the agent's own measure. */
    compound: text(),
    sortOrder: integer().notNull().default(0),
    hidden: boolean().notNull().default(false),
  },
  (t) => [index("stock_forms_agent_idx").on(t.agentSlug)],
);

export const conditions = pgTable("conditions", {
  slug: text().primaryKey(),
  name: text().notNull(),
  description: text().notNull().default(""),
  sortOrder: integer().notNull().default(0),
  hidden: boolean().notNull().default(false),
});
