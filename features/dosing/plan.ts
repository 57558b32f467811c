import {
  concentrationFromMl,
  doseMlForTarget,
  DosingInputError,
  stockMgPerMl,
  type ConcentrationUnit,
  type Stock,
} from "./concentration";
import { measurable, type Measure } from "./syringe";
import { toleranceFor } from "./strength";
import type { DryPlan } from "./dry-salt";
import { litresFromDimensions, toLitres, type LengthUnit, type VolumeUnit } from "./units";

export type VolumeInput =
  | { kind: "volume"; volume: number; unit: VolumeUnit }
  | {
      kind: "dimensions";
      length: number;
      width: number;
      depth: number;
      unit: LengthUnit;
      displacementPercent?: number;
    };

export interface PlanInput {
  agentSlug: string;
  unit: ConcentrationUnit;
  stock: Stock;
  water: VolumeInput;
  /** Either the target concentration, or the mL already added. */
  target?: number;
  addedMl?: number;
  fraction?: number;
}

export interface Plan {
  agent: string;
  unit: ConcentrationUnit;
  volumeL: number;
  stockMgPerMl: number;
  target: number | null;
  doseMl: number;
  concentration: number;
  /** Grams of the active the full dose puts in the water: for salt, the dry salt to dissolve instead of brine. */
  activeGrams: number;
  measured: Measure;
  firstDose?: { fraction: number; doseMl: number; concentration: number; measured: Measure };
  /** Where the label strength has a published tolerance: the concentration it really gives lies in this range. */
  strengthRange?: {
    lowPercent: number;
    highPercent: number;
    concentrationLow: number;
    concentrationHigh: number;
    source: string;
  };
}

const mgPerLPerUnit = (unit: ConcentrationUnit) => (unit === "g/L" ? 1000 : 1);

export function volumeLitres(w: VolumeInput): number {
  if (w.kind === "volume") {
    if (!(w.volume > 0)) throw new DosingInputError("volume", "Water volume must be above 0.");
    return toLitres(w.volume, w.unit);
  }
  for (const [field, v] of [
    ["length", w.length],
    ["width", w.width],
    ["depth", w.depth],
  ] as const) {
    if (!(v > 0)) throw new DosingInputError(field, `Tank ${field} must be above 0.`);
  }
  const d = w.displacementPercent ?? 0;
  if (!(d >= 0 && d < 100))
    throw new DosingInputError("displacementPercent", "Displacement is a percentage from 0 up to (not including) 100.");
  return litresFromDimensions(w.length, w.width, w.depth, w.unit, d);
}

/** The whole planner calculation; the same function serves the page, the API and report checks. */
export function planDose(input: PlanInput): Plan {
  const volumeL = volumeLitres(input.water);
  const mgPerMl = stockMgPerMl(input.stock);
  const hasTarget = input.target !== undefined;
  const hasAdded = input.addedMl !== undefined;
  if (hasTarget === hasAdded) {
    throw new DosingInputError(
      hasTarget ? "addedMl" : "target",
      "Give either a target concentration or the mL added, not both.",
    );
  }
  if (hasTarget && !(input.target! > 0)) throw new DosingInputError("target", "Target concentration must be above 0.");
  if (hasAdded && !(input.addedMl! > 0)) throw new DosingInputError("addedMl", "Millilitres added must be above 0.");
  const f = input.fraction;
  if (f !== undefined && !(f > 0 && f <= 1))
    throw new DosingInputError("fraction", "The first-dose fraction must be above 0 and at most 1.");

  const doseMl = hasTarget ? doseMlForTarget(input.target!, volumeL, mgPerMl, input.unit) : input.addedMl!;
  const concentration = hasTarget ? input.target! : concentrationFromMl(doseMl, volumeL, mgPerMl, input.unit);
  if (!Number.isFinite(doseMl) || !Number.isFinite(concentration) || !(volumeL > 0)) {
    throw new DosingInputError(
      hasTarget ? "target" : "addedMl",
      "These numbers are too large or too small to give a dose: check the volume and amounts.",
    );
  }
  const plan: Plan = {
    agent: input.agentSlug,
    unit: input.unit,
    volumeL,
    stockMgPerMl: mgPerMl,
    target: hasTarget ? input.target! : null,
    doseMl,
    concentration,
    activeGrams: (concentration * mgPerLPerUnit(input.unit) * volumeL) / 1000,
    measured: measurable(doseMl),
  };
  if (f !== undefined) {
    plan.firstDose = {
      fraction: f,
      doseMl: doseMl * f,
      concentration: concentration * f,
      measured: measurable(doseMl * f),
    };
  }
  const tol = toleranceFor(input.agentSlug, input.stock.percent);
  if (tol && tol.basis === input.stock.basis) {
    const scale = (p: number) => concentration * (p / input.stock.percent);
    plan.strengthRange = {
      lowPercent: tol.lowPercent,
      highPercent: tol.highPercent,
      concentrationLow: scale(tol.lowPercent),
      concentrationHigh: scale(tol.highPercent),
      source: tol.source,
    };
  }
  return plan;
}

export interface ChecklistItem {
  at: Date;
  kind: "dose" | "check" | "end";
  label: string;
}

/** A dated redosing and watching plan: a dose every `redoseHours`, then `watchDays` of watching. */
export function redoseChecklist(
  start: Date,
  doses: number,
  redoseHours: number | null,
  watchDays: number,
): ChecklistItem[] {
  const items: ChecklistItem[] = [];
  const hour = 3600_000;
  const n = redoseHours ? Math.max(1, doses) : 1;
  for (let i = 0; i < n; i++) {
    const at = new Date(start.getTime() + i * (redoseHours ?? 0) * hour);
    items.push({ at, kind: "dose", label: `Dose ${i + 1} of ${n}` });
    items.push({
      at: new Date(at.getTime() + hour),
      kind: "check",
      label: `Watch the fish for an hour after dose ${i + 1}`,
    });
  }
  const last = items.filter((x) => x.kind === "dose").at(-1)!.at;
  for (let d = 1; d <= watchDays; d++) {
    items.push({
      at: new Date(last.getTime() + d * 24 * hour),
      kind: d === watchDays ? "end" : "check",
      label:
        d === watchDays ? "Last day of watching: record the outcome" : `Day ${d} after the last dose: check the fish`,
    });
  }
  return items;
}

export interface CourseItem extends ChecklistItem {
  /** For doses: the measured mL to add (or, for dry salt, the weighed grams) and the concentration it makes. */
  doseMl?: number;
  doseGrams?: number;
  concentration?: number;
  reduced?: boolean;
}

/**
 * The dated course of a plan: the first dose reduced when the plan has a first-dose fraction below 1, later doses
 * full, each followed by a check, then the days of watching.
 */
export function courseSchedule(
  plan: Plan | DryPlan,
  start: Date,
  doses: number,
  redoseHours: number | null,
  watchDays: number,
): CourseItem[] {
  let n = 0;
  return redoseChecklist(start, doses, redoseHours, watchDays).map((item) => {
    if (item.kind !== "dose") return item;
    const reduced = n++ === 0 && plan.firstDose !== undefined && plan.firstDose.fraction < 1;
    if ("form" in plan && plan.form === "dry") {
      const d = reduced ? plan.firstDose! : plan;
      return {
        ...item,
        doseGrams: d.weighed.grams > 0 ? d.weighed.grams : d.doseGrams,
        concentration: d.concentration,
        reduced,
      };
    }
    const d = reduced ? (plan as Plan).firstDose! : (plan as Plan);
    return { ...item, doseMl: d.measured.ml > 0 ? d.measured.ml : d.doseMl, concentration: d.concentration, reduced };
  });
}
