// Stock strength and concentration arithmetic. Percent w/v is grams of solute per 100 mL of
// solution; percent w/w is grams per 100 g, so mg/mL needs the solution's density (g/mL).

export type StockBasis = "w/v" | "w/w";
export type ConcentrationUnit = "mg/L" | "g/L";

export interface Stock {
  percent: number;
  basis: StockBasis;
  /** g/mL; required for w/w. */
  densityGPerMl?: number | null;
  /** Mass share of the dissolved compound that is the active being dosed; 1 when the same. */
  activeFraction?: number | null;
}

export class DosingInputError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
    this.name = "DosingInputError";
  }
}

/** mg of active per mL of stock. */
export function stockMgPerMl(stock: Stock): number {
  if (!(stock.percent > 0 && stock.percent <= 100)) {
    throw new DosingInputError("stockPercent", "Stock strength must be above 0 % and at most 100 %.");
  }
  let gramsPer100Ml = stock.percent;
  if (stock.basis === "w/w") {
    const d = stock.densityGPerMl;
    if (d == null)
      throw new DosingInputError("densityGPerMl", "A % w/w strength needs the solution's density in g/mL.");
    if (!(d >= 0.5 && d <= 3)) throw new DosingInputError("densityGPerMl", "Density must be between 0.5 and 3 g/mL.");
    gramsPer100Ml = stock.percent * d;
  }
  const active = stock.activeFraction ?? 1;
  if (!(active > 0 && active <= 1))
    throw new DosingInputError("activeFraction", "Active fraction must be above 0 and at most 1.");
  return gramsPer100Ml * 10 * active;
}

/** How many mg/L one unit of the agent's concentration is. */
const mgPerLPerUnit = (unit: ConcentrationUnit) => (unit === "g/L" ? 1000 : 1);

/** mL of stock that brings `volumeL` litres to `target` (in the agent's unit). */
export function doseMlForTarget(
  target: number,
  volumeL: number,
  mgPerMl: number,
  unit: ConcentrationUnit = "mg/L",
): number {
  return (target * mgPerLPerUnit(unit) * volumeL) / mgPerMl;
}

/** The concentration (in the agent's unit) that `addedMl` of stock makes in `volumeL` litres. */
export function concentrationFromMl(
  addedMl: number,
  volumeL: number,
  mgPerMl: number,
  unit: ConcentrationUnit = "mg/L",
): number {
  return (addedMl * mgPerMl) / volumeL / mgPerLPerUnit(unit);
}

/** Relative disagreement of a stated concentration with the computed one (|stated − computed| / computed). */
export function relativeDisagreement(stated: number, computed: number): number {
  if (computed === 0) return stated === 0 ? 0 : Infinity;
  return Math.abs(stated - computed) / computed;
}

export const STATED_CONCENTRATION_TOLERANCE = 0.15;
