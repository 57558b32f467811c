import { z } from "zod";
import {
  MIN_WATER_LITRES,
  MIN_WATER_MESSAGE,
  temperatureUnits,
  toCelsius,
  toLitres,
  volumeUnits,
} from "@/features/dosing";

export const sizeClasses = ["juvenile", "subadult", "adult"] as const;
export const settings = ["bare", "planted", "other"] as const;
export const lossCauses = ["treatment", "disease", "unknown"] as const;
export const distressLevels = ["none", "mild", "severe"] as const;
export const conditionOutcomes = ["cleared", "improved", "unchanged", "worse"] as const;
export const reportStatuses = ["draft", "awaiting_review", "accepted", "returned", "declined", "retracted"] as const;
export type ReportStatus = (typeof reportStatuses)[number];

export const statusLabels: Record<ReportStatus, string> = {
  draft: "Draft",
  awaiting_review: "Awaiting review",
  accepted: "Accepted",
  returned: "Returned for changes",
  declined: "Declined",
  retracted: "Retracted",
};

/** The report's chosen values in words, for pages that show a report (the stored values are for the API). */
export const reportValueLabels: Record<string, string> = {
  juvenile: "juvenile",
  subadult: "sub-adult",
  adult: "adult",
  bare: "bare hospital tank",
  planted: "planted or furnished tank",
  other: "other",
  treatment: "the treatment",
  disease: "the disease",
  unknown: "not sure",
  none: "none seen",
  mild: "mild",
  severe: "severe",
  cleared: "cleared",
  improved: "improved",
  unchanged: "unchanged",
  worse: "worse",
};

/** What each event in a report's history did, as a sentence's predicate ("Tobin accepted it"). */
export const historyActionWords: Record<string, string> = {
  created: "started the draft",
  course_opened: "opened a course log",
  submitted: "submitted it for review",
  resubmitted: "resubmitted it",
  accept: "accepted it",
  return: "returned it for changes",
  decline: "declined it",
  retract: "retracted it",
  propose_accept: "accepted it and asked a second moderator to accept too (dose above the ceiling)",
  photo_added: "added a photo",
  dose_logged: "logged a dose",
  entry_corrected: "corrected a course entry",
  entry_struck: "struck out a course entry",
  map_species: "mapped the species to the catalogue",
  correct_loss_cause: "corrected the likely cause of losses",
  imported: "imported it",
};
/** An event's action in words; one this list lacks still reads as words, never as its internal name. */
export const describeHistoryAction = (action: string) => historyActionWords[action] ?? action.replaceAll("_", " ");

// Messages are shown to people as they are (the form uses these schemas too): plain words, no field names or codes;
// the issue's path says which field. `missing` is the sentence for an answer not given at all.
const n = (x: number) => x.toLocaleString("en-GB");
const enumOf = <T extends readonly [string, ...string[]]>(values: T, what: string) =>
  z.enum(values, { error: `Choose ${what}.` });
const int = (field: string, min: number, max: number, missing?: string) =>
  z
    .number({ error: (iss) => (iss.input === undefined && missing) || `${field} must be a whole number.` })
    .int(`${field} must be a whole number.`)
    .min(min, `${field} must be at least ${n(min)}.`)
    .max(max, `${field} must be at most ${n(max)}.`);
const positive = (field: string, max: number, missing?: string) =>
  z
    .number({ error: (iss) => (iss.input === undefined && missing) || `${field} must be a number.` })
    .positive(`${field} must be above 0.`)
    .max(max, `${field} must be at most ${n(max)}.`);
const text = (field: string, max: number) =>
  z
    .string({ error: `${field} must be text.` })
    .trim()
    .max(max, `${field} is at most ${max} characters.`);

/** A calendar date that is not in the future (a day's grace for time zones ahead of UTC). */
export const pastDate = z
  .string({
    error: (iss) =>
      iss.input === undefined ? "Give the date the course started." : "Give the date as year-month-day (YYYY-MM-DD).",
  })
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Give the date as year-month-day (YYYY-MM-DD).")
  .refine(
    (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    "That date is not on the calendar.",
  )
  .refine((s) => Date.parse(`${s}T00:00:00Z`) <= Date.now() + 86_400_000, "The course cannot start in the future.")
  .refine((s) => s >= "1990-01-01", "Give a date in 1990 or later.");

export const waterSchema = z.strictObject({
  volume: positive("Water volume", 1_000_000, "Give the water volume."),
  volumeUnit: enumOf(volumeUnits, "the unit of the volume"),
  temperature: z.number({
    error: (iss) => (iss.input === undefined ? "Give the water temperature." : "Temperature must be a number."),
  }),
  temperatureUnit: enumOf(temperatureUnits, "°C or °F"),
  ph: z
    .number({ error: "pH must be a number." })
    .min(0, "pH is between 0 and 14.")
    .max(14, "pH is between 0 and 14.")
    .nullish(),
  setting: enumOf(settings, "the kind of tank"),
});

export const treatmentSchema = z.strictObject({
  agentSlug: z.string({ error: "Choose the treatment agent." }).min(1, "Choose the treatment agent."),
  /** A catalogue stock form: only a named form's reading (e.g. a compound's active fraction) applies to the percentage. */
  stockFormId: z.string().min(1, "Choose one of the listed bottles, or type the strength.").nullable().optional(),
  stockPercent: positive("Stock strength", 100).nullish(),
  stockBasis: z.enum(["w/v", "w/w"], { error: "Choose what the strength is of (w/v or w/w)." }).nullish(),
  stockDensityGPerMl: z
    .number({ error: "Density must be a number." })
    .min(0.5, "Density is between 0.5 and 3 g/mL.")
    .max(3, "Density is between 0.5 and 3 g/mL.")
    .nullish(),
  amountMl: positive("Amount per dose", 100_000).nullish(),
  statedConcentration: positive("Stated concentration", 100_000).nullish(),
  doses: int("Number of doses", 1, 100, "Give the number of doses."),
  intervalHours: positive("Hours between doses", 24 * 60).nullish(),
  otherTreatments: text("Other treatments", 500).nullish(),
});

export const outcomeSchema = z.strictObject({
  fishLost: int("Fish lost", 0, 100_000, "Give the number of fish lost (0 if none)."),
  lossCause: enumOf(lossCauses, "the likely cause of the losses").nullable(),
  distress: enumOf(distressLevels, "the distress seen"),
  condition: enumOf(conditionOutcomes, "how the condition ended"),
  observedDaysAfter: int("Days watched", 0, 365, "Give the days watched after the last dose."),
  notes: text("Notes", 4000).nullish(),
});

const base = {
  speciesId: z
    .string({ error: "Choose the species, or “not listed”." })
    .min(1, "Choose the species, or “not listed”.")
    .nullable(),
  speciesOther: text("Species (not listed)", 200).nullish(),
  fishCount: int("Fish treated", 1, 100_000, "Give the number of fish treated."),
  sizeClass: enumOf(sizeClasses, "the size of the fish"),
  conditionSlug: z.string({ error: "Choose the condition treated." }).min(1, "Choose the condition treated."),
  startedOn: pastDate,
  showName: z.boolean({ error: "Say whether to show your name (yes or no)." }),
};

type Ctx = z.RefinementCtx;
/** A field a draft may have cleared (null) as well as left out. */
type Clearable<T> = { [K in keyof T]?: T[K] | null };
interface Crossable {
  speciesId?: string | null;
  speciesOther?: string | null;
  fishCount?: number;
  water?: Clearable<z.infer<typeof waterSchema>>;
  treatment?: Clearable<z.infer<typeof treatmentSchema>>;
  outcome?: Clearable<z.infer<typeof outcomeSchema>>;
}

/** The cross-field rules; in a draft they apply once both sides of a rule are present. */
function crossRules(r: Crossable, ctx: Ctx, complete: boolean) {
  if (r.speciesId === null && !r.speciesOther?.trim() && (complete || "speciesOther" in r)) {
    ctx.addIssue({
      code: "custom",
      path: ["speciesOther"],
      message: "Name the species when it is not in the catalogue.",
    });
  }
  const w = r.water;
  if (
    w?.volume != null &&
    w.volume > 0 &&
    w.volumeUnit != null &&
    toLitres(w.volume, w.volumeUnit) < MIN_WATER_LITRES
  ) {
    ctx.addIssue({ code: "custom", path: ["water", "volume"], message: MIN_WATER_MESSAGE });
  }
  if (w?.temperature != null && w.temperatureUnit != null) {
    const c = toCelsius(w.temperature, w.temperatureUnit);
    if (c < 0 || c > 45)
      ctx.addIssue({
        code: "custom",
        path: ["water", "temperature"],
        message: "Temperature must be between 0 and 45 °C (32 and 113 °F).",
      });
  }
  const t = r.treatment;
  if (t) {
    const hasAmount = t.amountMl != null;
    if (complete && !hasAmount && t.statedConcentration == null) {
      ctx.addIssue({
        code: "custom",
        path: ["treatment", "amountMl"],
        message: "Give the mL added per dose, or failing that the concentration you aimed for.",
      });
    }
    if (hasAmount && t.stockPercent == null && (complete || "stockPercent" in t)) {
      ctx.addIssue({
        code: "custom",
        path: ["treatment", "stockPercent"],
        message: "Give the stock strength (%) of what you added.",
      });
    }
    if (t.doses != null && t.doses > 1 && t.intervalHours == null && (complete || "intervalHours" in t)) {
      ctx.addIssue({
        code: "custom",
        path: ["treatment", "intervalHours"],
        message: "Give the hours between doses when there was more than one.",
      });
    }
  }
  const o = r.outcome;
  if (o?.fishLost != null) {
    if (r.fishCount !== undefined && o.fishLost > r.fishCount) {
      ctx.addIssue({
        code: "custom",
        path: ["outcome", "fishLost"],
        message: "Fish lost cannot be more than fish treated.",
      });
    }
    if (o.fishLost > 0 && o.lossCause == null && (complete || "lossCause" in o)) {
      ctx.addIssue({
        code: "custom",
        path: ["outcome", "lossCause"],
        message: "Say the likely cause when fish were lost.",
      });
    }
    if (o.fishLost === 0 && o.lossCause != null) {
      ctx.addIssue({
        code: "custom",
        path: ["outcome", "lossCause"],
        message: "Leave the cause empty when no fish were lost.",
      });
    }
  }
}

/** POST /api/reports: a complete report (api.md). */
export const reportInputSchema = z
  .object({
    ...base,
    water: waterSchema,
    treatment: treatmentSchema,
    outcome: outcomeSchema,
    submit: z.boolean().optional(),
  })
  .strict()
  .superRefine((r, ctx) => crossRules(r, ctx, true));

/**
 * The optional fields, which take null as "not given": in a PATCH, null clears one (a member removing a stated
 * concentration that a moderator questioned, or a pH they were unsure of) while absent leaves it as it is.
 */
export const clearableFields = {
  water: ["ph"],
  treatment: [
    "stockPercent",
    "stockBasis",
    "stockDensityGPerMl",
    "amountMl",
    "statedConcentration",
    "intervalHours",
    "otherTreatments",
  ],
  outcome: ["notes"],
} as const;

/** A draft or a PATCH: any subset, nested objects partial, optional fields cleared with null; the same field rules. */
export const reportDraftSchema = z
  .object({
    speciesId: base.speciesId.optional(),
    speciesOther: base.speciesOther,
    fishCount: base.fishCount.optional(),
    sizeClass: base.sizeClass.optional(),
    conditionSlug: base.conditionSlug.optional(),
    startedOn: base.startedOn.optional(),
    showName: base.showName.optional(),
    water: waterSchema.partial().optional(),
    treatment: treatmentSchema.partial().optional(),
    outcome: outcomeSchema.partial().optional(),
    courseOpen: z.boolean().optional(),
  })
  .strict()
  .superRefine((r, ctx) => crossRules(r, ctx, false));

/**
 * The report form's five steps (the last, photos, has no fields): each step's fields of reportInputSchema, complete,
 * with the cross rules that concern them, so the form checks a step by the server's own rules and messages.
 * The outcome step also reads the fish treated (from the first step) for "fish lost cannot be more than treated".
 */
export const reportStepSchemas = [
  z
    .object({
      speciesId: base.speciesId,
      speciesOther: base.speciesOther,
      fishCount: base.fishCount,
      sizeClass: base.sizeClass,
      conditionSlug: base.conditionSlug,
      startedOn: base.startedOn,
    })
    .superRefine((r, ctx) => crossRules(r, ctx, true)),
  z.object({ water: waterSchema }).superRefine((r, ctx) => crossRules(r, ctx, true)),
  z.object({ treatment: treatmentSchema }).superRefine((r, ctx) => crossRules(r, ctx, true)),
  z
    .object({ outcome: outcomeSchema, showName: base.showName, fishCount: base.fishCount.optional() })
    .superRefine((r, ctx) => crossRules(r, ctx, true)),
] as const;

export type ReportInput = z.infer<typeof reportInputSchema>;
export type ReportDraft = z.infer<typeof reportDraftSchema>;

export const courseEntrySchema = z
  .object({
    kind: z.enum(["dose", "observation"], { error: "kind must be dose or observation." }),
    at: z.iso.datetime({ offset: true, error: "at must be a date and time (ISO 8601)." }),
    amountMl: positive("Amount", 100_000).optional(),
    /** A dose of dry salt weighed in grams (treatments dosed in g/L), instead of amountMl of a solution. */
    amountGrams: positive("Grams", 100_000).optional(),
    text: text("Observation", 2000).optional(),
    /** A photo already added to this report (POST /api/reports/:id/photos), shown with the observation. */
    photoId: z.string().uuid("photoId must be the id of a photo of this report.").optional(),
    /** The keeper confirms an unusual entry: a time in the future, or over 3× the planned dose. */
    confirm: z.boolean({ error: "confirm must be true or false." }).optional(),
  })
  .strict()
  .superRefine((e, ctx) => {
    if (e.kind === "dose") doseAmountRule(e, ctx);
    if (e.kind === "observation" && !e.text)
      ctx.addIssue({ code: "custom", path: ["text"], message: "Describe what you saw." });
    if (!e.confirm && isFuture(e.at)) ctx.addIssue({ code: "custom", path: ["at"], message: FUTURE_MESSAGE });
  });

/** A dose is either mL of a solution or grams of dry salt: exactly one of the two. */
function doseAmountRule(e: { amountMl?: number; amountGrams?: number }, ctx: Ctx, required = true) {
  if (e.amountMl !== undefined && e.amountGrams !== undefined)
    ctx.addIssue({
      code: "custom",
      path: ["amountGrams"],
      message: "Give either amountMl (mL of a solution) or amountGrams (grams of dry salt), not both.",
    });
  else if (required && e.amountMl === undefined && e.amountGrams === undefined)
    ctx.addIssue({
      code: "custom",
      path: ["amountMl"],
      message: "Give the mL added for a dose (amountMl), or the grams of dry salt weighed (amountGrams).",
    });
}

/** A little slack for clocks that disagree; beyond it a time is "in the future" and must be confirmed. */
const isFuture = (at: string) => Date.parse(at) > Date.now() + 5 * 60_000;
const FUTURE_MESSAGE = "This time is in the future: check the date, or send confirm: true if it is right.";

/** A correction of one course entry (amount, time, text), or striking it out: entries are never deleted. */
export const courseEntryPatchSchema = z
  .object({
    at: z.iso.datetime({ offset: true, error: "at must be a date and time (ISO 8601)." }).optional(),
    amountMl: positive("Amount", 100_000).optional(),
    /** A corrected dose in grams of dry salt; the entry then holds grams instead of mL. */
    amountGrams: positive("Grams", 100_000).optional(),
    text: text("Text", 2000).optional(),
    struck: z
      .literal(true, { error: "struck can only be true: a struck entry stays in the log, crossed out." })
      .optional(),
    /** Why it was corrected or struck; kept in the report's history. */
    note: text("Note", 500).optional(),
    confirm: z.boolean({ error: "confirm must be true or false." }).optional(),
  })
  .strict()
  .superRefine((e, ctx) => {
    const changes =
      e.at !== undefined || e.amountMl !== undefined || e.amountGrams !== undefined || e.text !== undefined;
    doseAmountRule(e, ctx, false);
    if (e.struck && changes)
      ctx.addIssue({
        code: "custom",
        path: ["struck"],
        message: "Strike an entry out, or correct it, not both at once.",
      });
    if (!e.struck && !changes)
      ctx.addIssue({
        code: "custom",
        path: [],
        message: "Give the corrected amountMl, amountGrams, at or text, or struck: true.",
      });
    if (e.at !== undefined && !e.confirm && isFuture(e.at))
      ctx.addIssue({ code: "custom", path: ["at"], message: FUTURE_MESSAGE });
  });
export type CourseEntryPatch = z.infer<typeof courseEntryPatchSchema>;

export const listMineQuerySchema = z.object({
  scope: z.enum(["mine"], { error: "scope must be mine, or all (moderators and admins)." }).default("mine"),
  status: z.enum(reportStatuses, { error: `status must be one of: ${reportStatuses.join(", ")}.` }).optional(),
  sort: z
    .enum(["updatedAt", "startedOn", "status", "concentration", "species", "agent"], {
      error: "sort must be updatedAt, startedOn, status, concentration, species or agent.",
    })
    .default("updatedAt"),
  dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc." }).default("desc"),
  page: z.coerce.number({ error: "page must be a number." }).int().min(1, "page starts at 1.").default(1),
  pageSize: z.coerce
    .number({ error: "pageSize must be a number." })
    .int()
    .min(1)
    .max(100, "pageSize is at most 100.")
    .default(20),
});
export type ListMineQuery = z.infer<typeof listMineQuerySchema>;
