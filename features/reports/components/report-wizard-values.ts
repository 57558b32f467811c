import { zodResolver } from "@hookform/resolvers/zod";
import type { FieldErrors, Resolver } from "react-hook-form";
import { clearableFields, reportStepSchemas } from "../schemas";

/**
 * What the report form holds: the API's nested body, every answer as the text typed or chosen (numbers are read
 * only when a step is checked or saved). Field names are the API's paths, so a server issue lands on its field.
 */
export interface WizardValues {
  speciesId: string;
  speciesOther: string;
  fishCount: string;
  sizeClass: string;
  conditionSlug: string;
  startedOn: string;
  water: {
    volume: string;
    volumeUnit: string;
    temperature: string;
    temperatureUnit: string;
    ph: string;
    setting: string;
  };
  treatment: {
    agentSlug: string;
    stockFormId: string;
    stockPercent: string;
    stockBasis: string;
    stockDensityGPerMl: string;
    amountMl: string;
    statedConcentration: string;
    doses: string;
    intervalHours: string;
    otherTreatments: string;
  };
  outcome: {
    fishLost: string;
    lossCause: string;
    distress: string;
    condition: string;
    observedDaysAfter: string;
    notes: string;
  };
  showName: "yes" | "no";
}

/** The choice that stands for "the species is not in the catalogue" (sent as speciesId null). */
export const SPECIES_NOT_LISTED = "__other";

/** A typed number; a comma is read as the decimal mark. Empty is "not given"; anything else unreadable is NaN. */
export const readNumber = (v: string | undefined) =>
  v === undefined || v.trim() === "" ? undefined : Number(v.trim().replace(",", "."));
const readText = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : v.trim());

/** The part of the report that one step edits, as the API's nested body (undefined: not given). */
export function stepBody(step: number, v: WizardValues): Record<string, unknown> {
  if (step === 0) {
    const notListed = v.speciesId === SPECIES_NOT_LISTED;
    return {
      speciesId: notListed ? null : readText(v.speciesId),
      speciesOther: notListed ? (readText(v.speciesOther) ?? "") : undefined,
      fishCount: readNumber(v.fishCount),
      sizeClass: readText(v.sizeClass),
      conditionSlug: readText(v.conditionSlug),
      startedOn: readText(v.startedOn),
    };
  }
  if (step === 1) {
    const w = v.water;
    return {
      water: {
        volume: readNumber(w.volume),
        volumeUnit: readText(w.volumeUnit),
        temperature: readNumber(w.temperature),
        temperatureUnit: readText(w.temperatureUnit),
        ph: readNumber(w.ph),
        setting: readText(w.setting),
      },
    };
  }
  if (step === 2) {
    const t = v.treatment;
    return {
      treatment: {
        agentSlug: readText(t.agentSlug),
        stockFormId: readText(t.stockFormId) ?? null,
        stockPercent: readNumber(t.stockPercent),
        stockBasis: readText(t.stockBasis),
        stockDensityGPerMl: readNumber(t.stockDensityGPerMl),
        amountMl: readNumber(t.amountMl),
        statedConcentration: readNumber(t.statedConcentration),
        doses: readNumber(t.doses),
        intervalHours: readNumber(t.intervalHours),
        otherTreatments: readText(t.otherTreatments),
      },
    };
  }
  if (step === 3) {
    const o = v.outcome;
    const lost = readNumber(o.fishLost);
    return {
      outcome: {
        fishLost: lost,
        lossCause: lost ? (readText(o.lossCause) ?? null) : null,
        distress: readText(o.distress),
        condition: readText(o.condition),
        observedDaysAfter: readNumber(o.observedDaysAfter),
        notes: readText(o.notes),
      },
      showName: v.showName === "yes",
    };
  }
  return {};
}

/** The body a step saves (PATCH /api/reports/:id or POST /api/reports/drafts): JSON leaves out what was not given. */
export function stepPatch(step: number, v: WizardValues): Record<string, unknown> {
  const body = stepBody(step, v);
  // An optional answer the member emptied is sent as null, which clears it (absent would keep the old value).
  for (const section of ["water", "treatment", "outcome"] as const) {
    const part = body[section] as Record<string, unknown> | undefined;
    if (part) for (const name of clearableFields[section]) if (part[name] === undefined) part[name] = null;
  }
  if (step === 0 && body.speciesOther === undefined) body.speciesOther = null;
  return JSON.parse(JSON.stringify(body));
}

/**
 * Checks the current step (the resolver's context) with the server's own schema for it, reportStepSchemas.
 * The outcome step also gets the fish treated, which one of its rules compares with.
 */
export const wizardResolver: Resolver<WizardValues, number> = async (values, step = 0, options) => {
  const schema = reportStepSchemas[step as 0 | 1 | 2 | 3] as (typeof reportStepSchemas)[number] | undefined;
  if (!schema) return { values, errors: {} };
  const body =
    step === 3 ? { ...stepBody(3, values), fishCount: readNumber(values.fishCount) } : stepBody(step, values);
  // The resolver reads the converted body, not the typed text: the types differ, the field paths do not.
  const result = await zodResolver(schema)(body as never, undefined, options as never);
  const errors = result.errors as FieldErrors<WizardValues>;
  return Object.keys(errors).length ? { values: {}, errors } : { values, errors: {} };
};

/** Which step a field (an API path such as "water.volume") is on, for the submit checklist; 4 is photos and submit. */
export function stepOfPath(path: string): number {
  const head = path.split(".")[0] ?? "";
  if (["speciesId", "speciesOther", "fishCount", "sizeClass", "conditionSlug", "startedOn"].includes(head)) return 0;
  if (head === "water") return 1;
  if (head === "treatment") return 2;
  if (head === "outcome" || head === "showName") return 3;
  return 4;
}
