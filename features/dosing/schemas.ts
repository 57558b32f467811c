import { z } from "zod";
import { doseWarningCodes } from "./guard-rails";
import { lengthUnits, litresFromDimensions, MIN_WATER_LITRES, MIN_WATER_MESSAGE, toLitres, volumeUnits } from "./units";

const num = (field: string) =>
  z.coerce.number({ error: `${field} must be a number.` }).refine(Number.isFinite, `${field} must be a finite number.`);
const positive = (field: string) => num(field).refine((v) => v > 0, `${field} must be above 0.`);

const doseQueryFields = z.object({
  agent: z.string({ error: "agent is required: an agent slug from /api/catalogue." }).min(1, "agent is required."),
  stockPercent: positive("stockPercent")
    .refine((v) => v <= 100, "stockPercent is at most 100.")
    .optional(),
  stockFormId: z.string().min(1).optional(),
  basis: z.enum(["w/v", "w/w"], { error: "basis must be w/v or w/w." }).optional(),
  densityGPerMl: positive("densityGPerMl")
    .refine((v) => v >= 0.5 && v <= 3, "densityGPerMl must be between 0.5 and 3 g/mL.")
    .optional(),
  volume: positive("volume").optional(),
  volumeUnit: z.enum(volumeUnits, { error: "volumeUnit must be L, mL, gal_us or gal_imp." }).optional(),
  length: positive("length").optional(),
  width: positive("width").optional(),
  depth: positive("depth").optional(),
  lengthUnit: z.enum(lengthUnits, { error: "lengthUnit must be cm or in." }).optional(),
  displacementPercent: num("displacementPercent")
    .refine((v) => v >= 0 && v < 100, "displacementPercent must be from 0 up to (not including) 100.")
    .optional(),
  target: positive("target").optional(),
  addedMl: positive("addedMl").optional(),
  form: z
    .enum(["stock", "dry"], { error: "form must be stock (a solution measured in mL) or dry (salt weighed in grams)." })
    .optional(),
  addedGrams: positive("addedGrams").optional(),
  fraction: num("fraction")
    .refine((v) => v > 0 && v <= 1, "fraction must be above 0 and at most 1 (for example 0.5 for a half dose).")
    .optional(),
  speciesId: z.string().min(1, "speciesId names a species from /api/catalogue.").optional(),
  group: z.string().min(1, "group names a species group slug from /api/catalogue.").optional(),
});

type DoseQueryFields = z.infer<typeof doseQueryFields>;

function checkDoseQuery(q: DoseQueryFields, ctx: z.RefinementCtx) {
  const dry = q.form === "dry";
  if (dry) {
    // Dry salt is weighed: there is no stock strength and nothing is measured in mL.
    for (const f of ["stockPercent", "stockFormId", "basis", "densityGPerMl"] as const) {
      if (q[f] !== undefined)
        ctx.addIssue({
          code: "custom",
          path: [f],
          message: `Dry salt has no stock strength: leave ${f} out with form=dry.`,
        });
    }
    if (q.addedMl !== undefined)
      ctx.addIssue({
        code: "custom",
        path: ["addedMl"],
        message: "Dry salt is weighed: give addedGrams instead of addedMl with form=dry.",
      });
  } else if (q.addedGrams !== undefined) {
    ctx.addIssue({
      code: "custom",
      path: ["addedGrams"],
      message: "addedGrams is for dry salt: add form=dry, or give addedMl of the stock.",
    });
  } else if (q.stockPercent === undefined && q.stockFormId === undefined) {
    ctx.addIssue({
      code: "custom",
      path: ["stockPercent"],
      message: "stockPercent is required (or a stockFormId from the catalogue).",
    });
  }
  const byVolume = q.volume !== undefined || q.volumeUnit !== undefined;
  const dims = [q.length, q.width, q.depth, q.lengthUnit].some((v) => v !== undefined);
  if (byVolume && dims) {
    ctx.addIssue({ code: "custom", path: ["volume"], message: "Give the volume or the tank's dimensions, not both." });
  } else if (byVolume) {
    if (
      q.volume !== undefined &&
      q.volume > 0 &&
      q.volumeUnit !== undefined &&
      toLitres(q.volume, q.volumeUnit) < MIN_WATER_LITRES
    )
      ctx.addIssue({ code: "custom", path: ["volume"], message: MIN_WATER_MESSAGE });
    if (q.volume === undefined)
      ctx.addIssue({ code: "custom", path: ["volume"], message: "volume is required with volumeUnit." });
    if (q.volumeUnit === undefined)
      ctx.addIssue({
        code: "custom",
        path: ["volumeUnit"],
        message: "volumeUnit is required with volume: L, mL, gal_us or gal_imp.",
      });
  } else if (dims) {
    for (const f of ["length", "width", "depth", "lengthUnit"] as const) {
      if (q[f] === undefined)
        ctx.addIssue({ code: "custom", path: [f], message: `${f} is required when giving the tank's dimensions.` });
    }
    if (
      q.length !== undefined &&
      q.width !== undefined &&
      q.depth !== undefined &&
      q.lengthUnit !== undefined &&
      q.length > 0 &&
      q.width > 0 &&
      q.depth > 0 &&
      litresFromDimensions(q.length, q.width, q.depth, q.lengthUnit) < MIN_WATER_LITRES
    )
      ctx.addIssue({ code: "custom", path: ["depth"], message: MIN_WATER_MESSAGE });
  } else {
    ctx.addIssue({
      code: "custom",
      path: ["volume"],
      message: "Give the water volume (volume and volumeUnit) or the tank's length, width, depth and lengthUnit.",
    });
  }
  const added = dry ? q.addedGrams : q.addedMl;
  const addedName = dry ? "addedGrams" : "addedMl";
  if (q.target !== undefined && added !== undefined) {
    ctx.addIssue({ code: "custom", path: [addedName], message: `Give either target or ${addedName}, not both.` });
  } else if (q.target === undefined && added === undefined && !(dry && q.addedMl !== undefined)) {
    ctx.addIssue({
      code: "custom",
      path: ["target"],
      message: `Give a target concentration, or ${addedName} to see what a dose made.`,
    });
  }
}

/** Query of GET /api/dose (docs/api.md). Cross-field rules say which field to fix. */
export const doseQuerySchema = doseQueryFields.superRefine(checkDoseQuery);

export type DoseQuery = z.infer<typeof doseQuerySchema>;

/** GET /api/dose/plan.ics: the planner's query plus when to start and how many doses. */
export const planIcsQuerySchema = doseQueryFields
  .extend({
    start: z.iso.datetime({
      offset: true,
      error: "start must be an ISO date and time, for example 2026-12-02T18:00:00Z.",
    }),
    doses: z.coerce
      .number({ error: "doses must be a whole number." })
      .int("doses must be a whole number.")
      .min(1, "doses is at least 1.")
      .max(30, "doses is at most 30.")
      .default(1),
    intervalHours: positive("intervalHours")
      .refine((v) => v <= 24 * 60, "intervalHours is at most 1440 (60 days).")
      .optional(),
  })
  .superRefine(checkDoseQuery);

export type PlanIcsQuery = z.infer<typeof planIcsQuerySchema>;

const measureSchema = z.object({ ml: z.number(), step: z.number(), tool: z.string() });
const weighSchema = z.object({ grams: z.number(), step: z.number(), tool: z.string() });

export const doseResponseSchema = z.object({
  agent: z.string(),
  unit: z.enum(["mg/L", "g/L"]),
  volumeL: z.number(),
  form: z
    .enum(["stock", "dry"])
    .describe(
      "stock: a solution measured in mL; dry: salt weighed in grams (form=dry), where the mL fields and stock are null",
    ),
  stockMgPerMl: z.number().nullable(),
  target: z.number().nullable(),
  doseMl: z.number().nullable(),
  concentration: z.number(),
  activeGrams: z
    .number()
    .describe("grams of the active the full dose adds (for salt: dry salt to dissolve instead of brine)"),
  doseGrams: z.number().optional().describe("form=dry: grams of dry salt for the full dose"),
  weighed: weighSchema.optional().describe("form=dry: the grams rounded down to what a scale reads"),
  measured: measureSchema.nullable(),
  firstDose: z
    .object({
      fraction: z.number(),
      doseMl: z.number().nullable(),
      doseGrams: z.number().optional(),
      concentration: z.number(),
      measured: measureSchema.nullable(),
      weighed: weighSchema.optional(),
    })
    .optional(),
  strengthRange: z
    .object({
      lowPercent: z.number(),
      highPercent: z.number(),
      concentrationLow: z.number(),
      concentrationHigh: z.number(),
      source: z.string(),
    })
    .optional(),
  stock: z
    .object({
      percent: z.number(),
      basis: z.enum(["w/v", "w/w"]),
      densityGPerMl: z.number().nullable(),
      of: z
        .enum(["compound", "agent"])
        .describe(
          "compound: the percentage is of a compound, activeFraction of it is the agent; agent: it counts the agent's unit itself",
        ),
      compound: z.string().nullable(),
      activeFraction: z.number(),
      presetId: z.string().nullable(),
    })
    .nullable(),
  warnings: z.array(z.object({ code: z.enum(doseWarningCodes), message: z.string() })),
  evidence: z
    .object({
      group: z.object({ slug: z.string(), name: z.string() }),
      reports: z.number(),
      sparse: z.boolean(),
      toleratedDose: z.object({ median: z.number().nullable(), max: z.number().nullable() }).loose(),
      lowestAdverseDose: z.number().nullable(),
    })
    .loose()
    .optional()
    .describe("The group's evidence Summary for the agent (with speciesId or group)"),
  suggestedFirstDose: z
    .object({
      fraction: z.number(),
      concentration: z.number(),
      doseMl: z.number().nullable(),
      doseGrams: z.number().optional(),
      limitedBy: z.enum(["median", "lowest_adverse", "bmdl"]),
      measured: measureSchema.nullable(),
      weighed: weighSchema.optional(),
    })
    .nullable()
    .optional()
    .describe(
      "With speciesId or group: a cautious first dose from the evidence; null when the group has no tolerated median",
    ),
  risk: z
    .object({
      dose: z.number(),
      risk: z.number(),
      low: z.number(),
      high: z.number(),
      level: z.number(),
      extrapolated: z.boolean(),
    })
    .nullable()
    .optional()
    .describe(
      "With speciesId or group: the fitted chance (anecdotal) that the planned concentration goes badly, with its interval; null without a fitted dose-response",
    ),
});
