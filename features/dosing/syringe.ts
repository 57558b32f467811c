// What a keeper can actually measure: a 1 mL syringe has 0.01 mL marks, a 10 mL syringe 0.2 mL marks,
// a kitchen measuring jug 5 mL marks above 100 mL (common practice, no published source).
export interface Measure {
  ml: number;
  step: number;
  tool: string;
}

const tools = [
  { upTo: 1, step: 0.01, tool: "1 mL syringe (0.01 mL marks)" },
  { upTo: 10, step: 0.2, tool: "10 mL syringe (0.2 mL marks)" },
  { upTo: 100, step: 1, tool: "measuring cylinder or several syringe fills (1 mL marks)" },
  { upTo: Infinity, step: 5, tool: "measuring jug (5 mL marks)" },
];

/**
 * The dose rounded down to the nearest mark of the smallest tool that holds it, so the measured
 * dose is never above the computed one. A dose below the smallest mark measures as 0: dilute first.
 */
export function measurable(ml: number): Measure {
  const t = tools.find((x) => ml <= x.upTo)!;
  const marks = Math.floor(ml / t.step + 1e-9);
  return { ml: Number((marks * t.step).toFixed(2)), step: t.step, tool: t.tool };
}
