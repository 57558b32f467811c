import "server-only";
import { and, eq } from "drizzle-orm";
import { schema, type Db } from "@/db/client";
import { AppError, type FieldIssue } from "@/features/shared/errors";
import {
  concentrationFromMl,
  DosingInputError,
  readStrength,
  relativeDisagreement,
  STATED_CONCENTRATION_TOLERANCE,
  toCelsius,
  toLitres,
  type StockBasis,
  type TemperatureUnit,
  type VolumeUnit,
} from "@/features/dosing";
import type { ReportColumns, ReportRow } from "./mapping";

/** Checks that catalogue references exist; unknown ones are 422 naming the field. */
export async function checkReferences(db: Db, c: ReportColumns): Promise<void> {
  const issues: FieldIssue[] = [];
  if (c.speciesId) {
    const [s] = await db
      .select({ id: schema.species.id })
      .from(schema.species)
      .where(eq(schema.species.id, c.speciesId));
    if (!s)
      issues.push({
        path: "speciesId",
        message: `No species "${c.speciesId}" in the catalogue; choose one, or "not listed" (null) and name it.`,
      });
  }
  if (c.conditionSlug) {
    const [s] = await db
      .select({ slug: schema.conditions.slug })
      .from(schema.conditions)
      .where(eq(schema.conditions.slug, c.conditionSlug));
    if (!s) issues.push({ path: "conditionSlug", message: `No condition "${c.conditionSlug}" in the catalogue.` });
  }
  if (c.agentSlug) {
    const [s] = await db
      .select({ slug: schema.agents.slug })
      .from(schema.agents)
      .where(eq(schema.agents.slug, c.agentSlug));
    if (!s) issues.push({ path: "treatment.agentSlug", message: `No agent "${c.agentSlug}" in the catalogue.` });
  }
  if (issues.length) throw new AppError("invalid", "Some fields need fixing; see issues.", issues);
}

/**
 * Values the server computes from a report's own fields: litres, °C, the species' group, the stock's
 * density and active fraction from the agent's presets, and the peak single-dose concentration.
 */
export async function derive(db: Db, r: ReportRow): Promise<ReportColumns> {
  const out: ReportColumns = {};
  out.volumeL =
    r.waterVolume != null && r.waterVolumeUnit ? toLitres(r.waterVolume, r.waterVolumeUnit as VolumeUnit) : null;
  out.temperatureC =
    r.temperature != null && r.temperatureUnit ? toCelsius(r.temperature, r.temperatureUnit as TemperatureUnit) : null;
  if (r.speciesId) {
    const [s] = await db
      .select({ groupSlug: schema.species.groupSlug, mergedInto: schema.species.mergedInto })
      .from(schema.species)
      .where(eq(schema.species.id, r.speciesId));
    out.groupSlug = s?.groupSlug ?? null;
  } else if (r.speciesOther) {
    out.groupSlug = r.groupSlug; // a moderator maps "not listed" species; keep any mapping made
  }
  let unit = "mg/L";
  out.concentration = null;
  out.stockDensityGPerMl = r.stockDensityGPerMl;
  out.stockActiveFraction = 1;
  if (r.agentSlug) {
    const [a] = await db
      .select({ unit: schema.agents.unit })
      .from(schema.agents)
      .where(eq(schema.agents.slug, r.agentSlug));
    unit = a?.unit ?? "mg/L";
  }
  // One reading of the strength (features/dosing readStrength): a stock form applies only when the report names it.
  let preset = null;
  if (r.stockFormId) {
    [preset] = await db
      .select()
      .from(schema.stockForms)
      .where(and(eq(schema.stockForms.id, r.stockFormId), eq(schema.stockForms.agentSlug, r.agentSlug ?? "")));
    if (!preset) {
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        {
          path: "treatment.stockFormId",
          message: `No stock form "${r.stockFormId}" for this agent; see /api/catalogue.`,
        },
      ]);
    }
  }
  if (r.stockPercent != null || preset) {
    const basis = (r.stockBasis ?? preset?.basis ?? "w/v") as StockBasis;
    const needsDensity = basis === "w/w" && r.stockDensityGPerMl == null && preset?.densityGPerMl == null;
    if (needsDensity && r.amountMl != null && out.volumeL) {
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        {
          path: "treatment.stockDensityGPerMl",
          message: "A % w/w strength that is not one of the agent's stock forms needs the solution's density in g/mL.",
        },
      ]);
    }
    if (!needsDensity) {
      try {
        const stock = readStrength({
          percent: r.stockPercent ?? undefined,
          basis,
          densityGPerMl: r.stockDensityGPerMl,
          preset,
        });
        out.stockPercent = stock.percent;
        out.stockDensityGPerMl = stock.densityGPerMl;
        out.stockActiveFraction = stock.activeFraction;
        if (r.amountMl != null && out.volumeL)
          out.concentration = concentrationFromMl(
            r.amountMl,
            out.volumeL,
            stock.mgPerMl,
            unit === "g/L" ? "g/L" : "mg/L",
          );
      } catch (err) {
        if (!(err instanceof DosingInputError)) throw err;
        const path =
          err.field === "basis"
            ? "treatment.stockBasis"
            : err.field === "densityGPerMl"
              ? "treatment.stockDensityGPerMl"
              : "treatment.stockPercent";
        throw new AppError("invalid", "Some fields need fixing; see issues.", [{ path, message: err.message }]);
      }
    }
  }
  if (out.concentration === null && r.statedConcentration != null) {
    out.concentration = r.statedConcentration;
  }
  return out;
}

/** True when a stated concentration disagrees with the computed one by more than 15 %. */
export function statedMismatch(
  r: Pick<ReportRow, "amountMl" | "statedConcentration" | "concentration">,
): number | null {
  if (r.amountMl == null || r.statedConcentration == null || r.concentration == null) return null;
  const d = relativeDisagreement(r.statedConcentration, r.concentration);
  return d > STATED_CONCENTRATION_TOLERANCE ? d : null;
}
