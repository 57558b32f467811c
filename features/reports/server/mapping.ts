import "server-only";
import { schema } from "@/db/client";
import type { ReportDraft, ReportInput } from "../schemas";

export type ReportRow = typeof schema.reports.$inferSelect;
export type ReportColumns = Partial<typeof schema.reports.$inferInsert>;

type Section = "water" | "treatment" | "outcome";

/** One table of where each API field lives: [column, section of the nested body or null, field name there]. */
const fields: [keyof ReportRow, Section | null, string][] = [
  ["speciesId", null, "speciesId"],
  ["speciesOther", null, "speciesOther"],
  ["fishCount", null, "fishCount"],
  ["sizeClass", null, "sizeClass"],
  ["conditionSlug", null, "conditionSlug"],
  ["startedOn", null, "startedOn"],
  ["showName", null, "showName"],
  ["waterVolume", "water", "volume"],
  ["waterVolumeUnit", "water", "volumeUnit"],
  ["temperature", "water", "temperature"],
  ["temperatureUnit", "water", "temperatureUnit"],
  ["ph", "water", "ph"],
  ["setting", "water", "setting"],
  ["agentSlug", "treatment", "agentSlug"],
  ["stockFormId", "treatment", "stockFormId"],
  ["stockPercent", "treatment", "stockPercent"],
  ["stockBasis", "treatment", "stockBasis"],
  ["stockDensityGPerMl", "treatment", "stockDensityGPerMl"],
  ["amountMl", "treatment", "amountMl"],
  ["statedConcentration", "treatment", "statedConcentration"],
  ["doses", "treatment", "doses"],
  ["intervalHours", "treatment", "intervalHours"],
  ["otherTreatments", "treatment", "otherTreatments"],
  ["fishLost", "outcome", "fishLost"],
  ["lossCause", "outcome", "lossCause"],
  ["distress", "outcome", "distress"],
  ["conditionOutcome", "outcome", "condition"],
  ["observedDaysAfter", "outcome", "observedDaysAfter"],
  ["notes", "outcome", "notes"],
];

/** Nested API body → flat columns (only the fields present). */
export function toColumns(input: ReportInput | ReportDraft): ReportColumns {
  const c: Record<string, unknown> = {};
  const body = input as Record<string, unknown>;
  for (const [column, section, name] of fields) {
    const v = section ? (body[section] as Record<string, unknown> | undefined)?.[name] : body[name];
    if (v !== undefined) c[column] = v;
  }
  return c as ReportColumns;
}

/**
 * Flat row → the nested shape of the API body (what a complete report is checked against). Empty columns
 * become absent fields, except speciesId (null means "not listed") and a loss cause once losses are known.
 */
export function toInput(r: ReportRow): Record<string, unknown> {
  const out: Record<string, unknown> = { water: {}, treatment: {}, outcome: {} };
  for (const [column, section, name] of fields) {
    const v = r[column];
    const keepNull = column === "speciesId" || (column === "lossCause" && r.fishLost !== null);
    if (v === null && !keepNull) continue;
    if (section) (out[section] as Record<string, unknown>)[name] = v;
    else out[name] = v;
  }
  return out;
}
