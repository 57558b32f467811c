import { prng } from "@/db/demo-data";

/** The known curve the generated reports are drawn from: risk 10 % at 20 mg/L and 50 % at 50 mg/L. */
export const TRUE_B = -Math.log(1 / 9) / Math.log10(50 / 20);
export const TRUE_A = -TRUE_B * Math.log10(50);

/**
 * `count` reports with doses spread log-uniformly over 5–90 mg/L (to the half mg/L, so some share a dose),
 * each going badly with probability 1 / (1 + exp(−(a + b·log10 dose))), drawn from a seeded generator.
 */
export function generatedReports(seed: number, count: number): { dose: number; adverse: boolean }[] {
  const rand = prng(seed);
  return Array.from({ length: count }, () => {
    const dose = Math.round(2 * 5 * 18 ** rand()) / 2;
    const p = 1 / (1 + Math.exp(-(TRUE_A + TRUE_B * Math.log10(dose))));
    return { dose, adverse: rand() < p };
  });
}
