import "server-only";
import { getCatalogue } from "@/features/catalogue/server";
import { doseQuerySchema } from "@/features/dosing";
import { planDoseWithEvidence } from "@/features/evidence/server";
import type { CoursePlanView } from "@/features/reports/components/course-plan-note";
import { AppError } from "@/features/shared/errors";

const fmt = (n: number, digits = 2) => n.toLocaleString("en-GB", { maximumFractionDigits: digits });

/**
 * The planner's plan behind a "start a course" address, worked out again on the server with the group's evidence:
 * the same query /api/dose reads, so the warnings shown are the server's own. Null when the address holds no plan.
 */
export async function coursePlanFromParams(sp: Record<string, string | undefined>): Promise<CoursePlanView | null> {
  if (!sp.target || !sp.agentSlug) return null;
  const raw: Record<string, string | undefined> = {
    agent: sp.agentSlug,
    form: sp.form === "dry" ? "dry" : undefined,
    stockFormId: sp.form === "dry" ? undefined : sp.stockFormId,
    stockPercent: sp.form === "dry" || sp.stockFormId ? undefined : sp.stockPercent,
    basis: sp.form === "dry" || sp.stockFormId ? undefined : sp.stockBasis,
    volume: sp.volume,
    volumeUnit: sp.volumeUnit,
    target: sp.target,
    fraction: sp.fraction,
    speciesId: sp.speciesId,
    group: sp.speciesId ? undefined : sp.group,
  };
  for (const k of Object.keys(raw)) if (raw[k] === undefined) delete raw[k];
  const q = doseQuerySchema.safeParse(raw);
  if (!q.success) return null;
  let answer;
  try {
    answer = await planDoseWithEvidence(q.data);
  } catch (err) {
    // An address edited by hand (an unknown agent or species) just shows no plan; the form still works.
    if (err instanceof AppError) return null;
    throw err;
  }
  const catalogue = await getCatalogue();
  const agent = catalogue.agents.find((a) => a.slug === answer.agent);
  const species = catalogue.species.find((s) => s.id === q.data.speciesId);
  const groupSlug = species?.groupSlug ?? q.data.group;
  const group = catalogue.speciesGroups.find((g) => g.slug === groupSlug);
  const fish = species
    ? `${species.commonName} (${species.scientificName})${group ? `, ${group.name}` : ""}`
    : group
      ? group.name
      : null;
  // What the keeper measures: the mL on the syringe's marks, or the grams on the scale, as the planner shows them.
  const amount = (a: {
    doseMl: number | null;
    measured: { ml: number } | null;
    doseGrams?: number;
    weighed?: { grams: number };
  }) =>
    a.doseMl == null
      ? `${fmt(a.weighed && a.weighed.grams > 0 ? a.weighed.grams : (a.doseGrams ?? 0), 1)} g of dry salt`
      : `${fmt(a.measured && a.measured.ml > 0 ? a.measured.ml : a.doseMl)} mL`;
  return {
    fish,
    agentName: agent?.name ?? answer.agent,
    unit: answer.unit,
    target: answer.concentration,
    fullAmount: amount(answer),
    volumeL: answer.volumeL,
    firstDose:
      answer.firstDose && answer.firstDose.fraction < 1
        ? {
            fraction: answer.firstDose.fraction,
            concentration: answer.firstDose.concentration,
            amount: amount(answer.firstDose),
          }
        : null,
    warnings: answer.warnings.map((w) => ({ code: w.code, message: w.message })),
    acknowledged: (sp.acknowledged ?? "").split(",").filter(Boolean),
  };
}
