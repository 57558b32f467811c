import "server-only";
import { and, eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError } from "@/features/shared/errors";
import { getClubSettings } from "./club";
import {
  DEFAULT_FIRST_DOSE_FRACTION,
  doseMlForTarget,
  doseWarnings,
  DosingInputError,
  gramsForTarget,
  planDrySalt,
  weighable,
  measurable,
  planDose,
  readStrength,
  suggestFirstDose,
  type DoseQuery,
  type DryPlan,
  type GuardEvidence,
  type Plan,
  type StockReading,
  type VolumeInput,
} from "@/features/dosing";

/** Reads a group's evidence for an agent; the evidence feature supplies it (it sits above this one). */
export type EvidenceLoader<E extends GuardEvidence> = (groupSlug: string, agentSlug: string) => Promise<E | null>;

const invalid = (path: string, message: string) =>
  new AppError("invalid", "Some query parameters need fixing; see issues.", [{ path, message }]);

/** The species group a query asks about: `group` directly, or the group of `speciesId` (following a merge). */
async function groupOfQuery(q: Pick<DoseQuery, "speciesId" | "group">): Promise<string | null> {
  if (q.speciesId === undefined && q.group === undefined) return null;
  const db = await getDb();
  let fromSpecies: string | null = null;
  if (q.speciesId !== undefined) {
    const [s] = await db.select().from(schema.species).where(eq(schema.species.id, q.speciesId));
    if (!s) throw invalid("speciesId", `No species "${q.speciesId}" in the catalogue; see /api/catalogue.`);
    const merged = s.mergedInto
      ? (await db.select().from(schema.species).where(eq(schema.species.id, s.mergedInto)))[0]
      : undefined;
    fromSpecies = (merged ?? s).groupSlug;
  }
  if (q.group !== undefined) {
    const [g] = await db
      .select()
      .from(schema.speciesGroups)
      .where(and(eq(schema.speciesGroups.slug, q.group), eq(schema.speciesGroups.hidden, false)));
    if (!g) throw invalid("group", `No species group "${q.group}" in the catalogue; see /api/catalogue.`);
    if (fromSpecies !== null && fromSpecies !== g.slug)
      throw invalid("group", `That species belongs to the group "${fromSpecies}", not "${g.slug}": give one of them.`);
    return g.slug;
  }
  return fromSpecies;
}

/** The agent and the stock reading of a query: a preset applies only when `stockFormId` names it. */
export async function readQueryStock(
  q: Pick<DoseQuery, "agent" | "stockFormId" | "stockPercent" | "basis" | "densityGPerMl">,
) {
  const db = await getDb();
  const [agent] = await db.select().from(schema.agents).where(eq(schema.agents.slug, q.agent));
  if (!agent) {
    throw new AppError("invalid", "Unknown agent; see /api/catalogue for the agents.", [
      { path: "agent", message: `No agent "${q.agent}" in the catalogue.` },
    ]);
  }
  let preset = null;
  if (q.stockFormId !== undefined) {
    [preset] = await db
      .select()
      .from(schema.stockForms)
      .where(
        and(
          eq(schema.stockForms.id, q.stockFormId),
          eq(schema.stockForms.agentSlug, agent.slug),
          eq(schema.stockForms.hidden, false),
        ),
      );
    if (!preset) {
      throw new AppError("invalid", "Unknown stock preset for this agent.", [
        { path: "stockFormId", message: `No stock preset "${q.stockFormId}" for ${agent.name}.` },
      ]);
    }
  }
  try {
    const stock = readStrength({ percent: q.stockPercent, basis: q.basis, densityGPerMl: q.densityGPerMl, preset });
    return { agent, stock };
  } catch (err) {
    if (err instanceof DosingInputError)
      throw invalid(err.field === "activeFraction" ? "stockFormId" : err.field, err.message);
    throw err;
  }
}

const stockEcho = (s: StockReading) => ({
  percent: s.percent,
  basis: s.basis,
  densityGPerMl: s.densityGPerMl,
  of: s.of,
  compound: s.compound,
  activeFraction: s.activeFraction,
  presetId: s.presetId,
});

/**
 * GET /api/dose: reads the stock strength, plans the dose, and checks it against the agent's plausible ceiling and,
 * when a species or group is named, that group's evidence (loaded by `loadEvidence`), offering a cautious first dose.
 * `scheduled` adds later doses to the checks (the calendar's course).
 */
export async function planDoseFromQuery<E extends GuardEvidence>(
  q: DoseQuery,
  options: {
    loadEvidence?: EvidenceLoader<E>;
    scheduled?: (plan: Plan) => { label: string; concentration: number }[];
  } = {},
) {
  const water: VolumeInput =
    q.volume !== undefined
      ? { kind: "volume", volume: q.volume, unit: q.volumeUnit! }
      : {
          kind: "dimensions",
          length: q.length!,
          width: q.width!,
          depth: q.depth!,
          unit: q.lengthUnit!,
          displacementPercent: q.displacementPercent,
        };
  if (q.form === "dry") return planDryFromQuery(q, water, options);
  const { agent, stock } = await readQueryStock(q);
  const groupSlug = await groupOfQuery(q);
  const unit = agent.unit === "g/L" ? "g/L" : "mg/L";
  let plan;
  try {
    plan = planDose({
      agentSlug: agent.slug,
      unit,
      stock: {
        percent: stock.percent,
        basis: stock.basis,
        densityGPerMl: stock.densityGPerMl,
        activeFraction: stock.activeFraction,
      },
      water,
      target: q.target,
      addedMl: q.addedMl,
      fraction: q.fraction,
    });
  } catch (err) {
    if (err instanceof DosingInputError) throw invalid(err.field, err.message);
    throw err;
  }

  let evidence: E | null | undefined;
  if (groupSlug !== null) {
    if (!options.loadEvidence) throw new Error("planDoseFromQuery: a group was named but no evidence loader was given");
    evidence = await options.loadEvidence(groupSlug, agent.slug);
  }
  const doses = [
    {
      label: plan.target !== null ? "the target" : "the concentration your mL make",
      concentration: plan.concentration,
    },
    ...(plan.firstDose ? [{ label: "the first dose", concentration: plan.firstDose.concentration }] : []),
    ...(options.scheduled?.(plan) ?? []),
  ];
  const warnings = doseWarnings({ unit, ceiling: agent.plausibleCeiling, doses, evidence });

  const answer = { ...plan, form: "stock" as const, stock: stockEcho(stock), warnings };
  if (evidence === undefined) return answer;
  const suggested = await suggestedOf(evidence, q.fraction);
  const suggestedFirstDose = suggested
    ? (() => {
        const doseMl = doseMlForTarget(suggested.concentration, plan.volumeL, stock.mgPerMl, unit);
        return { ...suggested, doseMl, measured: measurable(doseMl) };
      })()
    : null;
  return { ...answer, evidence, suggestedFirstDose };
}

/** The club's default share (½ or ⅓), or the keeper's own fraction where that is more cautious, applied to the evidence. */
async function suggestedOf(evidence: GuardEvidence | null, fraction: number | undefined) {
  const clubFraction = (await getClubSettings()).firstDoseFraction ?? DEFAULT_FIRST_DOSE_FRACTION;
  return suggestFirstDose(evidence, Math.min(fraction ?? clubFraction, clubFraction));
}

/** The checks every plan gets: the planned concentration, a reduced first dose, and any scheduled later doses. */
function checkedDoses<
  P extends { target: number | null; concentration: number; firstDose?: { concentration: number } },
>(plan: P, scheduled: ((plan: P) => { label: string; concentration: number }[]) | undefined) {
  return [
    {
      label: plan.target !== null ? "the target" : "the concentration your salt makes",
      concentration: plan.concentration,
    },
    ...(plan.firstDose ? [{ label: "the first dose", concentration: plan.firstDose.concentration }] : []),
    ...(scheduled?.(plan) ?? []),
  ];
}

/**
 * GET /api/dose with form=dry: salt weighed in grams instead of poured as brine. Only for agents dosed in g/L; the
 * same guard rails and evidence as a stock plan, with grams where a stock plan has mL (the mL fields are null).
 */
async function planDryFromQuery<E extends GuardEvidence>(
  q: DoseQuery,
  water: VolumeInput,
  options: { loadEvidence?: EvidenceLoader<E>; scheduled?: (plan: Plan) => { label: string; concentration: number }[] },
) {
  const db = await getDb();
  const [agent] = await db.select().from(schema.agents).where(eq(schema.agents.slug, q.agent));
  if (!agent) {
    throw new AppError("invalid", "Unknown agent; see /api/catalogue for the agents.", [
      { path: "agent", message: `No agent "${q.agent}" in the catalogue.` },
    ]);
  }
  if (agent.unit !== "g/L")
    throw invalid("form", `${agent.name} is dosed from a solution in mL; form=dry is for salt, dosed in g/L.`);
  const groupSlug = await groupOfQuery(q);
  let plan: DryPlan;
  try {
    plan = planDrySalt({
      agentSlug: agent.slug,
      unit: "g/L",
      water,
      target: q.target,
      addedGrams: q.addedGrams,
      fraction: q.fraction,
    });
  } catch (err) {
    if (err instanceof DosingInputError) throw invalid(err.field, err.message);
    throw err;
  }
  let evidence: E | null | undefined;
  if (groupSlug !== null) {
    if (!options.loadEvidence) throw new Error("planDoseFromQuery: a group was named but no evidence loader was given");
    evidence = await options.loadEvidence(groupSlug, agent.slug);
  }
  // The schedule only reads the concentration, the same for a dry and a stock plan.
  const scheduled = options.scheduled as ((p: typeof plan) => { label: string; concentration: number }[]) | undefined;
  const warnings = doseWarnings({
    unit: "g/L",
    ceiling: agent.plausibleCeiling,
    doses: checkedDoses(plan, scheduled),
    evidence,
  });
  const answer = {
    ...plan,
    doseMl: null,
    stockMgPerMl: null,
    measured: null,
    stock: null,
    firstDose: plan.firstDose ? { ...plan.firstDose, doseMl: null, measured: null } : undefined,
    warnings,
  };
  if (evidence === undefined) return answer;
  const suggested = await suggestedOf(evidence, q.fraction);
  const suggestedFirstDose = suggested
    ? (() => {
        const doseGrams = gramsForTarget(suggested.concentration, plan.volumeL, "g/L");
        return { ...suggested, doseMl: null, measured: null, doseGrams, weighed: weighable(doseGrams) };
      })()
    : null;
  return { ...answer, evidence, suggestedFirstDose };
}
