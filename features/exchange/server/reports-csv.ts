import "server-only";
import crypto from "node:crypto";
import Papa from "papaparse";
import { asc, eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError, type FieldIssue } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { zodIssues } from "@/features/shared/server/http";
import { assertRole, authSecret } from "@/features/members/server";
import { reportInputSchema, reportStatuses } from "@/features/reports";
import { derive, recordEvent } from "@/features/reports/server";
import { ANECDOTAL_TEXT } from "@/features/evidence";

const { reports } = schema;

/** The columns of the reports CSV, export and import alike. */
export const reportColumns = [
  "id", "status", "reporter", "species_id", "species_other", "group_slug", "fish_count", "size_class", "condition_slug", "started_on",
  "water_volume", "water_volume_unit", "temperature", "temperature_unit", "ph", "setting",
  "agent_slug", "stock_percent", "stock_basis", "stock_density_g_per_ml", "amount_ml", "stated_concentration", "doses", "interval_hours", "other_treatments",
  "fish_lost", "loss_cause", "distress", "condition_outcome", "observed_days_after", "notes", "concentration", "submitted_at", "decided_at",
] as const;

/** A stable pseudonym per member: the same member gets the same one in every export, and it reveals nothing. */
export function pseudonym(authorId: string): string {
  return `member-${crypto.createHmac("sha256", authSecret()).update(authorId).digest("hex").slice(0, 10)}`;
}

/** Every submitted report (not drafts), reporters pseudonymised; the anecdotal notice on the first line. */
export async function exportReportsCsv(actor: Actor | null): Promise<string> {
  assertRole(actor, ["moderator", "admin"], "export reports");
  const db = await getDb();
  const rows = await db.select().from(reports).orderBy(asc(reports.createdAt), asc(reports.id));
  const data = rows
    .filter((r) => r.status !== "draft")
    .map((r) => ({
      id: r.id, status: r.status, reporter: r.externalReporter ?? pseudonym(r.authorId), species_id: r.speciesId, species_other: r.speciesOther, group_slug: r.groupSlug,
      fish_count: r.fishCount, size_class: r.sizeClass, condition_slug: r.conditionSlug, started_on: r.startedOn,
      water_volume: r.waterVolume, water_volume_unit: r.waterVolumeUnit, temperature: r.temperature, temperature_unit: r.temperatureUnit, ph: r.ph, setting: r.setting,
      agent_slug: r.agentSlug, stock_percent: r.stockPercent, stock_basis: r.stockBasis, stock_density_g_per_ml: r.stockDensityGPerMl, amount_ml: r.amountMl,
      stated_concentration: r.statedConcentration, doses: r.doses, interval_hours: r.intervalHours, other_treatments: r.otherTreatments,
      fish_lost: r.fishLost, loss_cause: r.lossCause, distress: r.distress, condition_outcome: r.conditionOutcome, observed_days_after: r.observedDaysAfter, notes: r.notes,
      concentration: r.concentration, submitted_at: r.submittedAt?.toISOString() ?? null, decided_at: r.decidedAt?.toISOString() ?? null,
    }));
  return `# ${ANECDOTAL_TEXT}\n${Papa.unparse({ fields: [...reportColumns], data: data.map((d) => reportColumns.map((c) => d[c] ?? "")) })}\n`;
}

const num = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : Number(v));
const str = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : v.trim());

function rowToInput(r: Record<string, string>) {
  const lost = num(r.fish_lost);
  return {
    speciesId: str(r.species_id) ?? null,
    ...(str(r.species_other) ? { speciesOther: str(r.species_other) } : {}),
    fishCount: num(r.fish_count), sizeClass: str(r.size_class), conditionSlug: str(r.condition_slug), startedOn: str(r.started_on),
    water: { volume: num(r.water_volume), volumeUnit: str(r.water_volume_unit), temperature: num(r.temperature), temperatureUnit: str(r.temperature_unit), ph: num(r.ph), setting: str(r.setting) },
    treatment: {
      agentSlug: str(r.agent_slug), stockPercent: num(r.stock_percent), stockBasis: str(r.stock_basis), stockDensityGPerMl: num(r.stock_density_g_per_ml),
      amountMl: num(r.amount_ml), statedConcentration: num(r.stated_concentration), doses: num(r.doses), intervalHours: num(r.interval_hours), otherTreatments: str(r.other_treatments),
    },
    outcome: { fishLost: lost, lossCause: str(r.loss_cause) ?? null, distress: str(r.distress), condition: str(r.condition_outcome), observedDaysAfter: num(r.observed_days_after), notes: str(r.notes) },
    showName: false,
  };
}

export interface ImportResult {
  imported: number;
  rejected: { row: number; issues: FieldIssue[] }[];
  touched: { groupSlug: string | null; agentSlug: string | null }[];
}

/**
 * Imports reports from CSV (the export's columns). Each row is checked with the same schema as the API;
 * bad rows are listed with what to fix and not imported; good rows go in together. A row whose status is
 * "accepted" counts at once (the admin vouches for the file); any other row waits for review.
 */
export async function importReportsCsv(actor: Actor | null, text: string): Promise<ImportResult> {
  assertRole(actor, ["admin"], "import reports");
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, comments: "#", skipEmptyLines: "greedy", transformHeader: (h) => h.trim() });
  if (parsed.errors.some((e) => e.type === "Delimiter" || e.type === "Quotes")) {
    throw new AppError("bad_request", `The file could not be read as CSV (${parsed.errors[0]!.message}, row ${(parsed.errors[0]!.row ?? 0) + 2}).`);
  }
  const fields = parsed.meta.fields ?? [];
  const missing = ["fish_count", "agent_slug", "started_on"].filter((c) => !fields.includes(c));
  if (missing.length) throw new AppError("invalid", "The file lacks required columns; use the columns of the reports export.", missing.map((m) => ({ path: m, message: `Column ${m} is missing.` })));
  if (parsed.data.length > 20_000) throw new AppError("too_large", "At most 20,000 rows per import; split the file.");
  const db = await getDb();
  const known = {
    species: new Set((await db.select({ id: schema.species.id }).from(schema.species)).map((x) => x.id)),
    conditions: new Set((await db.select({ slug: schema.conditions.slug }).from(schema.conditions)).map((x) => x.slug)),
    agents: new Set((await db.select({ slug: schema.agents.slug }).from(schema.agents)).map((x) => x.slug)),
  };
  const rejected: ImportResult["rejected"] = [];
  const good: { row: number; input: ReturnType<typeof rowToInput>; status: string; reporter: string | null }[] = [];
  parsed.data.forEach((r, i) => {
    const row = i + 2; // 1-based, after the header line
    const input = rowToInput(r);
    const check = reportInputSchema.safeParse(JSON.parse(JSON.stringify(input)));
    const issues: FieldIssue[] = check.success ? [] : zodIssues(check.error);
    if (input.speciesId && !known.species.has(input.speciesId)) issues.push({ path: "species_id", message: `No species "${input.speciesId}" in the catalogue.` });
    if (input.conditionSlug && !known.conditions.has(input.conditionSlug)) issues.push({ path: "condition_slug", message: `No condition "${input.conditionSlug}".` });
    if (input.treatment.agentSlug && !known.agents.has(input.treatment.agentSlug)) issues.push({ path: "agent_slug", message: `No agent "${input.treatment.agentSlug}".` });
    const status = str(r.status) ?? "awaiting_review";
    if (!(reportStatuses as readonly string[]).includes(status) || status === "draft") issues.push({ path: "status", message: "status must be accepted, awaiting_review, returned, declined or retracted (or empty)." });
    if (issues.length) rejected.push({ row, issues });
    else good.push({ row, input, status: status === "accepted" ? "accepted" : "awaiting_review", reporter: str(r.reporter) ?? null });
  });
  const touched: ImportResult["touched"] = [];
  await db.transaction(async (tx) => {
    for (const g of good) {
      const id = crypto.randomUUID();
      const i = g.input;
      await tx.insert(reports).values({
        id, authorId: actor.id, status: g.status as "accepted", source: "import", externalReporter: g.reporter,
        speciesId: i.speciesId, speciesOther: i.speciesOther, fishCount: i.fishCount, sizeClass: i.sizeClass, conditionSlug: i.conditionSlug, startedOn: i.startedOn,
        waterVolume: i.water.volume, waterVolumeUnit: i.water.volumeUnit, temperature: i.water.temperature, temperatureUnit: i.water.temperatureUnit, ph: i.water.ph, setting: i.water.setting,
        agentSlug: i.treatment.agentSlug, stockPercent: i.treatment.stockPercent, stockBasis: i.treatment.stockBasis, stockDensityGPerMl: i.treatment.stockDensityGPerMl,
        amountMl: i.treatment.amountMl, statedConcentration: i.treatment.statedConcentration, doses: i.treatment.doses, intervalHours: i.treatment.intervalHours, otherTreatments: i.treatment.otherTreatments,
        fishLost: i.outcome.fishLost, lossCause: i.outcome.lossCause, distress: i.outcome.distress, conditionOutcome: i.outcome.condition, observedDaysAfter: i.outcome.observedDaysAfter, notes: i.outcome.notes,
        submittedAt: new Date(), decidedAt: g.status === "accepted" ? new Date() : null,
      });
      const [row] = await tx.select().from(reports).where(eq(reports.id, id));
      const d = await derive(tx as never, row!);
      await tx.update(reports).set(d).where(eq(reports.id, id));
      await recordEvent(tx, { reportId: id, actorId: actor.id, action: "imported", from: null, to: g.status, note: `CSV row ${g.row}` });
      if (g.status === "accepted") touched.push({ groupSlug: d.groupSlug ?? null, agentSlug: i.treatment.agentSlug ?? null });
    }
  });
  return { imported: good.length, rejected, touched };
}
