import { schema } from "@/db/client";
import type { ReportDraft, ReportInput } from "../schemas";

export type ReportRow = typeof schema.reports.$inferSelect;
export type ReportColumns = Partial<typeof schema.reports.$inferInsert>;

/** Nested API body → flat columns (only the fields present). */
export function toColumns(input: ReportInput | ReportDraft): ReportColumns {
  const c: ReportColumns = {};
  const set = <K extends keyof ReportColumns>(k: K, v: ReportColumns[K] | undefined) => {
    if (v !== undefined) c[k] = v;
  };
  set("speciesId", input.speciesId);
  set("speciesOther", input.speciesOther);
  set("fishCount", input.fishCount);
  set("sizeClass", input.sizeClass);
  set("conditionSlug", input.conditionSlug);
  set("startedOn", input.startedOn);
  set("showName", input.showName);
  const w = input.water;
  if (w) {
    set("waterVolume", w.volume);
    set("waterVolumeUnit", w.volumeUnit);
    set("temperature", w.temperature);
    set("temperatureUnit", w.temperatureUnit);
    set("ph", w.ph);
    set("setting", w.setting);
  }
  const t = input.treatment;
  if (t) {
    set("agentSlug", t.agentSlug);
    set("stockPercent", t.stockPercent);
    set("stockBasis", t.stockBasis);
    set("stockDensityGPerMl", t.stockDensityGPerMl);
    set("amountMl", t.amountMl);
    set("statedConcentration", t.statedConcentration);
    set("doses", t.doses);
    set("intervalHours", t.intervalHours);
    set("otherTreatments", t.otherTreatments);
  }
  const o = input.outcome;
  if (o) {
    set("fishLost", o.fishLost);
    set("lossCause", o.lossCause);
    set("distress", o.distress);
    set("conditionOutcome", o.condition);
    set("observedDaysAfter", o.observedDaysAfter);
    set("notes", o.notes);
  }
  return c;
}

const u = <T,>(v: T | null | undefined): T | undefined => (v === null ? undefined : v);

/** Flat row → the nested shape of the API body (what a complete report is checked against). */
export function toInput(r: ReportRow): Record<string, unknown> {
  return {
    speciesId: r.speciesId,
    ...(r.speciesOther ? { speciesOther: r.speciesOther } : {}),
    fishCount: u(r.fishCount),
    sizeClass: u(r.sizeClass),
    conditionSlug: u(r.conditionSlug),
    startedOn: u(r.startedOn),
    showName: r.showName,
    water: { volume: u(r.waterVolume), volumeUnit: u(r.waterVolumeUnit), temperature: u(r.temperature), temperatureUnit: u(r.temperatureUnit), ph: u(r.ph), setting: u(r.setting) },
    treatment: {
      agentSlug: u(r.agentSlug), stockPercent: u(r.stockPercent), stockBasis: u(r.stockBasis), stockDensityGPerMl: u(r.stockDensityGPerMl),
      amountMl: u(r.amountMl), statedConcentration: u(r.statedConcentration), doses: u(r.doses), intervalHours: u(r.intervalHours), otherTreatments: u(r.otherTreatments),
    },
    outcome: {
      fishLost: u(r.fishLost), lossCause: r.fishLost === null ? undefined : r.lossCause, distress: u(r.distress), condition: u(r.conditionOutcome),
      observedDaysAfter: u(r.observedDaysAfter), notes: u(r.notes),
    },
  };
}
