import { DosingInputError, type ConcentrationUnit } from "./concentration";
import { volumeLitres, type VolumeInput } from "./plan";

// Salt can be weighed dry instead of poured as brine. In g/L, grams to add = target (g/L) × litres: a concentration
// in g/L is grams of solute per litre of water, so no stock strength enters. (For dilute solutions 1 g/L is
// about 1 ppt by mass, since a litre of fresh water weighs about 1 kg.)

/** What a keeper can weigh: a pocket scale reads 0.1 g up to 100 g, a kitchen scale 1 g above (common practice, no published source). */
export interface Weighing {
  grams: number;
  step: number;
  tool: string;
}

const scales = [
  { upTo: 100, step: 0.1, tool: "pocket scale (0.1 g steps)" },
  { upTo: Infinity, step: 1, tool: "kitchen scale (1 g steps)" },
];

/** The grams rounded down to the scale's step, so the weighed dose is never above the computed one. */
export function weighable(grams: number): Weighing {
  const s = scales.find((x) => grams <= x.upTo)!;
  const steps = Math.floor(grams / s.step + 1e-9);
  return { grams: Number((steps * s.step).toFixed(1)), step: s.step, tool: s.tool };
}

export interface DryPlanInput {
  agentSlug: string;
  unit: ConcentrationUnit;
  water: VolumeInput;
  /** Either the target concentration (g/L), or the grams already dissolved. */
  target?: number;
  addedGrams?: number;
  fraction?: number;
}

/** A plan for a dry solid weighed in grams: no stock, so no mL. The shape mirrors Plan where the fields mean the same. */
export interface DryPlan {
  form: "dry";
  agent: string;
  unit: ConcentrationUnit;
  volumeL: number;
  target: number | null;
  concentration: number;
  /** Grams of dry salt for the full dose. */
  doseGrams: number;
  activeGrams: number;
  weighed: Weighing;
  firstDose?: { fraction: number; doseGrams: number; concentration: number; weighed: Weighing };
}

const gramsPerLitrePerUnit = (unit: ConcentrationUnit) => (unit === "g/L" ? 1 : 0.001);

/** Grams of a dry solid that bring `volumeL` litres to `target` (in the agent's unit). */
export function gramsForTarget(target: number, volumeL: number, unit: ConcentrationUnit = "g/L"): number {
  return target * gramsPerLitrePerUnit(unit) * volumeL;
}

/** The concentration (in the agent's unit) that `grams` of a dry solid make in `volumeL` litres. */
export function concentrationFromGrams(grams: number, volumeL: number, unit: ConcentrationUnit = "g/L"): number {
  return grams / volumeL / gramsPerLitrePerUnit(unit);
}

/** The planner's calculation for dry salt: grams for a target, or the concentration grams made. */
export function planDrySalt(input: DryPlanInput): DryPlan {
  const volumeL = volumeLitres(input.water);
  const hasTarget = input.target !== undefined;
  const hasAdded = input.addedGrams !== undefined;
  if (hasTarget === hasAdded) {
    throw new DosingInputError(
      hasTarget ? "addedGrams" : "target",
      "Give either a target concentration or the grams of dry salt added, not both.",
    );
  }
  if (hasTarget && !(input.target! > 0)) throw new DosingInputError("target", "Target concentration must be above 0.");
  if (hasAdded && !(input.addedGrams! > 0)) throw new DosingInputError("addedGrams", "Grams added must be above 0.");
  const f = input.fraction;
  if (f !== undefined && !(f > 0 && f <= 1))
    throw new DosingInputError("fraction", "The first-dose fraction must be above 0 and at most 1.");
  const doseGrams = hasTarget ? gramsForTarget(input.target!, volumeL, input.unit) : input.addedGrams!;
  const concentration = hasTarget ? input.target! : concentrationFromGrams(doseGrams, volumeL, input.unit);
  if (!Number.isFinite(doseGrams) || !Number.isFinite(concentration) || !(volumeL > 0)) {
    throw new DosingInputError(
      hasTarget ? "target" : "addedGrams",
      "These numbers are too large or too small to give a dose: check the volume and amounts.",
    );
  }
  const plan: DryPlan = {
    form: "dry",
    agent: input.agentSlug,
    unit: input.unit,
    volumeL,
    target: hasTarget ? input.target! : null,
    concentration,
    doseGrams,
    activeGrams: doseGrams,
    weighed: weighable(doseGrams),
  };
  if (f !== undefined) {
    plan.firstDose = {
      fraction: f,
      doseGrams: doseGrams * f,
      concentration: concentration * f,
      weighed: weighable(doseGrams * f),
    };
  }
  return plan;
}
