// Plain formatting shared by client and server components (the member's home renders it on the server), so it
// lives outside the "use client" course log.

const round = (n: number, digits = 1) => n.toLocaleString("en-GB", { maximumFractionDigits: digits });

/** A dose as the keeper measures it: mL on the syringe, or grams of dry salt on the scale. */
export function doseAmountText(d: { doseMl: number | null; doseGrams?: number | null }): string {
  return d.doseGrams != null ? `${round(d.doseGrams, 1)} g of dry salt` : `${round(d.doseMl ?? 0, 1)} mL`;
}
