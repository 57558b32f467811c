import "server-only";
import { and, count, eq, inArray, max, min, ne, sql } from "drizzle-orm";
import { schema, type Db } from "@/db/client";
import { statedMismatch } from "./derive";
import type { ReportRow } from "./mapping";

export interface Flag {
  code: string;
  message: string;
}

const pct = (x: number) => `${Math.round(x * 100)} %`;
const r2 = (x: number) => (Math.abs(x) >= 10 ? x.toFixed(1) : x.toPrecision(3));

/** Plausibility flags for a moderator, computed when a report is submitted. Each says why in plain words. */
export async function computeFlags(db: Db, r: ReportRow): Promise<{ flags: Flag[]; completeness: number }> {
  const flags: Flag[] = [];
  const mismatch = statedMismatch(r);
  if (mismatch !== null) {
    const dir = r.statedConcentration! > r.concentration! ? "above" : "below";
    flags.push({
      code: "stated_mismatch",
      message: `The stated concentration (${r2(r.statedConcentration!)}) is ${pct(mismatch)} ${dir} the ${r2(r.concentration!)} computed from the amount, stock and volume.`,
    });
  }
  let unit = "mg/L";
  if (r.agentSlug && r.concentration != null) {
    const [agent] = await db.select().from(schema.agents).where(eq(schema.agents.slug, r.agentSlug));
    unit = agent?.unit ?? unit;
    if (agent && r.concentration > agent.plausibleCeiling) {
      flags.push({
        code: "above_ceiling",
        message: `The dose, ${r2(r.concentration)} ${unit}, is above ${agent.name.toLowerCase()}'s plausible ceiling of ${agent.plausibleCeiling} ${unit}.`,
      });
    }
    if (r.groupSlug) {
      const [span] = await db
        .select({ lo: min(schema.reports.concentration), hi: max(schema.reports.concentration), n: count() })
        .from(schema.reports)
        .where(
          and(
            eq(schema.reports.status, "accepted"),
            eq(schema.reports.agentSlug, r.agentSlug),
            eq(schema.reports.groupSlug, r.groupSlug),
            ne(schema.reports.id, r.id),
          ),
        );
      if (span && span.n > 0 && span.lo != null && span.hi != null) {
        if (r.concentration < span.lo / 4 || r.concentration > span.hi * 4) {
          flags.push({
            code: "outside_group_range",
            message: `The dose, ${r2(r.concentration)} ${unit}, is far outside the ${r2(span.lo)}–${r2(span.hi)} ${unit} of this group's ${span.n} accepted report${span.n === 1 ? "" : "s"} (below a quarter of the lowest or above four times the highest).`,
          });
        }
      }
    }
  }
  if (r.temperatureC != null && (r.temperatureC < 10 || r.temperatureC > 34)) {
    flags.push({
      code: "temperature_unusual",
      message: `The water temperature, ${r2(r.temperatureC)} °C, is outside the 10–34 °C that aquarium fish live in.`,
    });
  }
  if (r.ph != null && (r.ph < 4.5 || r.ph > 9)) {
    flags.push({ code: "ph_unusual", message: `The pH, ${r.ph}, is outside the 4.5–9 that aquarium fish live in.` });
  }
  if (!r.speciesId) {
    flags.push({
      code: "species_not_listed",
      message: `The species "${r.speciesOther ?? "?"}" is not in the catalogue: map it to a catalogue species (or add one) before accepting.`,
    });
  }
  const [photoCount] = await db.select({ n: count() }).from(schema.photos).where(eq(schema.photos.reportId, r.id));
  const photos = photoCount?.n ?? 0;
  if (photos === 0) flags.push({ code: "no_photos", message: "The report has no photos." });
  if (r.agentSlug && r.startedOn && r.concentration != null) {
    const dupes = await db
      .select({ id: schema.reports.id })
      .from(schema.reports)
      .where(
        and(
          eq(schema.reports.authorId, r.authorId),
          eq(schema.reports.agentSlug, r.agentSlug),
          ne(schema.reports.id, r.id),
          inArray(schema.reports.status, ["awaiting_review", "accepted", "returned"]),
          r.speciesId
            ? eq(schema.reports.speciesId, r.speciesId)
            : eq(schema.reports.speciesOther, r.speciesOther ?? ""),
          sql`abs(${schema.reports.startedOn} - ${r.startedOn}::date) <= 3`,
          sql`abs(${schema.reports.concentration} - ${r.concentration}) <= 0.1 * ${r.concentration}`,
        ),
      )
      .limit(3);
    if (dupes.length) {
      flags.push({
        code: "suspected_duplicate",
        message: `Possibly the same course as ${dupes.map((d) => d.id).join(", ")}: same member, species and agent, start within three days, dose within 10 %.`,
      });
    }
  }
  const optional = [
    r.ph != null,
    r.stockPercent != null,
    r.amountMl != null,
    r.statedConcentration != null,
    (r.doses ?? 1) <= 1 || r.intervalHours != null,
    !!r.otherTreatments,
    !!r.notes,
    photos > 0,
  ];
  const completeness = optional.filter(Boolean).length / optional.length;
  return { flags, completeness };
}
