// Published tolerances on labelled strengths. The USP monograph for Hydrogen Peroxide Topical
// Solution allows 2.5–3.5 g of H₂O₂ per 100 mL for a "3 %" label (value from memory of the monograph).
export interface StrengthTolerance {
  agentSlug: string;
  labelPercent: number;
  lowPercent: number;
  highPercent: number;
  basis: "w/v" | "w/w";
  source: string;
}

export const strengthTolerances: StrengthTolerance[] = [
  {
    agentSlug: "hydrogen-peroxide",
    labelPercent: 3,
    lowPercent: 2.5,
    highPercent: 3.5,
    basis: "w/v",
    source: "USP monograph, Hydrogen Peroxide Topical Solution: 2.5–3.5 g H₂O₂ per 100 mL",
  },
];

export function toleranceFor(agentSlug: string, percent: number): StrengthTolerance | null {
  return strengthTolerances.find((t) => t.agentSlug === agentSlug && t.labelPercent === percent) ?? null;
}
