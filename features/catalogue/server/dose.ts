import "server-only";
import { and, eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError } from "@/features/shared/errors";
import { DosingInputError, planDose, type DoseQuery, type Stock, type VolumeInput } from "@/features/dosing";

/** GET /api/dose: resolves the agent and its stock preset from the catalogue, then plans the dose. */
export async function planDoseFromQuery(q: DoseQuery) {
  const db = await getDb();
  const [agent] = await db.select().from(schema.agents).where(eq(schema.agents.slug, q.agent));
  if (!agent) {
    throw new AppError("invalid", "Unknown agent; see /api/catalogue for the agents.", [{ path: "agent", message: `No agent "${q.agent}" in the catalogue.` }]);
  }
  const presets = await db.select().from(schema.stockForms).where(and(eq(schema.stockForms.agentSlug, agent.slug), eq(schema.stockForms.hidden, false)));
  let preset = q.stockFormId ? presets.find((p) => p.id === q.stockFormId) : undefined;
  if (q.stockFormId && !preset) {
    throw new AppError("invalid", "Unknown stock preset for this agent.", [{ path: "stockFormId", message: `No stock preset "${q.stockFormId}" for ${agent.name}.` }]);
  }
  const basis = q.basis ?? preset?.basis ?? "w/v";
  const percent = q.stockPercent ?? preset!.percent;
  preset ??= presets.find((p) => p.percent === percent && p.basis === basis);
  const stock: Stock = {
    percent,
    basis,
    densityGPerMl: q.densityGPerMl ?? preset?.densityGPerMl ?? null,
    activeFraction: preset?.activeFraction ?? 1,
  };
  const water: VolumeInput =
    q.volume !== undefined
      ? { kind: "volume", volume: q.volume, unit: q.volumeUnit! }
      : { kind: "dimensions", length: q.length!, width: q.width!, depth: q.depth!, unit: q.lengthUnit!, displacementPercent: q.displacementPercent };
  try {
    const plan = planDose({
      agentSlug: agent.slug,
      unit: agent.unit === "g/L" ? "g/L" : "mg/L",
      stock,
      water,
      target: q.target,
      addedMl: q.addedMl,
      fraction: q.fraction,
    });
    return {
      ...plan,
      stock: { percent, basis, densityGPerMl: stock.densityGPerMl ?? null, activeFraction: stock.activeFraction ?? 1, presetId: preset?.id ?? null },
    };
  } catch (err) {
    if (err instanceof DosingInputError) {
      throw new AppError("invalid", "Some query parameters need fixing; see issues.", [{ path: err.field, message: err.message }]);
    }
    throw err;
  }
}
