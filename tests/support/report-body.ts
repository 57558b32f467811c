/** A complete report body (docs/api.md) for tests; no imports, so suites outside the app process can use it. */
// Tests send invalid shapes on purpose and read nested fields back, so the body is loosely typed.
/* eslint-disable @typescript-eslint/no-explicit-any -- a deliberately loose request body, see above */
export function reportBody(over: Record<string, any> = {}): Record<string, any> {
  const base: Record<string, any> = {
    speciesId: "paracheirodon-innesi",
    fishCount: 6,
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-11-02",
    water: { volume: 40, volumeUnit: "L", temperature: 25, temperatureUnit: "C", ph: 7.0, setting: "bare" },
    treatment: {
      agentSlug: "hydrogen-peroxide",
      stockPercent: 3,
      stockBasis: "w/v",
      amountMl: 40,
      doses: 3,
      intervalHours: 48,
    },
    outcome: {
      fishLost: 0,
      lossCause: null,
      distress: "mild",
      condition: "cleared",
      observedDaysAfter: 7,
      notes: "Test report.",
    },
    showName: false,
  };
  const out: Record<string, any> = { ...base };
  for (const [k, v] of Object.entries(over)) {
    out[k] =
      v && typeof v === "object" && !Array.isArray(v) && base[k] && typeof base[k] === "object"
        ? { ...base[k], ...v }
        : v;
  }
  return out;
}
/* eslint-enable @typescript-eslint/no-explicit-any */
