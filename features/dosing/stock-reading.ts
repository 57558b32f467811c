import { DosingInputError, stockMgPerMl, type StockBasis } from "./concentration";

/** A catalogue stock form as the reading needs it. */
export interface StockPreset {
  id: string;
  percent: number;
  basis: StockBasis;
  densityGPerMl: number | null;
  /** Share of the compound's mass that is the dosed active; 1 when the percentage already counts the active. */
  activeFraction: number;
  /** The compound the percentage is of (e.g. "copper sulfate pentahydrate (CuSO₄·5H₂O)"); null: the agent's own measure. */
  compound?: string | null;
}

export interface StrengthInput {
  /** The label percentage; with a preset, defaults to the preset's. */
  percent?: number;
  basis?: StockBasis;
  densityGPerMl?: number | null;
  /** The stock form the keeper named; without one the percentage is the agent's own measure. */
  preset?: StockPreset | null;
}

/** How a strength was read: what its percentage counts, and the mg of active per mL that follows. */
export interface StockReading {
  percent: number;
  basis: StockBasis;
  densityGPerMl: number | null;
  /** "compound": the percentage is of a compound, of which `activeFraction` is the active; "agent": it counts the agent's unit itself. */
  of: "compound" | "agent";
  compound: string | null;
  activeFraction: number;
  presetId: string | null;
  mgPerMl: number;
}

/**
 * The one reading of a stock strength, used by the planner, the API, report derivation and the import.
 * A preset is applied only when named: a bare percentage is the agent's own measure (w/v: percent × 10 mg/mL),
 * never matched to a preset by its number, because two bottles of the same percentage can hold different things.
 */
export function readStrength(input: StrengthInput): StockReading {
  const preset = input.preset ?? null;
  const percent = input.percent ?? preset?.percent;
  if (percent === undefined)
    throw new DosingInputError("stockPercent", "Give the stock strength in %, or name one of the agent's stock forms.");
  const basis = input.basis ?? preset?.basis ?? "w/v";
  if (preset && basis !== preset.basis) {
    throw new DosingInputError(
      "basis",
      `That stock form is ${preset.basis}; leave the basis out or give ${preset.basis}.`,
    );
  }
  const densityGPerMl = input.densityGPerMl ?? preset?.densityGPerMl ?? null;
  const fromCompound = preset != null && (preset.activeFraction !== 1 || Boolean(preset.compound));
  const activeFraction = preset ? preset.activeFraction : 1;
  const mgPerMl = stockMgPerMl({
    percent,
    basis,
    densityGPerMl: basis === "w/w" ? densityGPerMl : null,
    activeFraction,
  });
  return {
    percent,
    basis,
    densityGPerMl: basis === "w/w" ? densityGPerMl : null,
    of: fromCompound ? "compound" : "agent",
    compound: fromCompound ? (preset.compound ?? null) : null,
    activeFraction,
    presetId: preset?.id ?? null,
    mgPerMl,
  };
}
