import { z } from "zod";
import type { DoseResponseFit, DoseResponseNone } from "./dose-response";

// Named in every summary and export; a change makes the app recompute stored summaries when it starts.
export const METHOD_VERSION = "2026.12-2+logit-log10-bmd10";
export const ANECDOTAL_TEXT =
  "Anecdotal evidence: members' own reports of treatments in their own tanks, checked by club moderators for plausibility only. Not veterinary advice; defer to an aquatic veterinarian and to local rules.";

const doseResponseFitSchema = z.object({
  model: z.literal("logit-log10"),
  a: z.number(),
  b: z.number(),
  seA: z.number(),
  seB: z.number(),
  covAB: z.number(),
  bmr: z.number(),
  bmd: z.number(),
  bmdl: z.number(),
  bmdu: z.number(),
  deviance: z.number(),
  df: z.number().int(),
  curve: z.array(z.object({ dose: z.number(), risk: z.number(), low: z.number(), high: z.number() })),
});
const doseResponseNoneSchema = z.object({ model: z.literal("logit-log10"), fit: z.null(), reason: z.string() });
/** P(adverse | dose) on log10 dose with the benchmark dose (statistics.md), or why it cannot be estimated. */
export const doseResponseSchema = z.union([doseResponseFitSchema, doseResponseNoneSchema]);

const interval = z.object({ value: z.number().nullable(), low: z.number().nullable(), high: z.number().nullable() });

export const summarySchema = z.object({
  group: z.object({ slug: z.string(), name: z.string() }),
  reports: z.number().int(),
  members: z.number().int(),
  fish: z.number().int(),
  tolerated: z.number().int(),
  toleratedShare: interval,
  toleratedDose: z.object({
    min: z.number().nullable(),
    p10: z.number().nullable(),
    p25: z.number().nullable(),
    median: z.number().nullable(),
    p75: z.number().nullable(),
    p90: z.number().nullable(),
    max: z.number().nullable(),
    medianInterval: z.object({ low: z.number(), high: z.number(), coverage: z.number() }).nullable(),
  }),
  lowestAdverseDose: z.number().nullable(),
  sparse: z.boolean(),
  doseResponse: doseResponseSchema,
});

export const bandSchema = z.object({
  from: z.number(),
  to: z.number().nullable(),
  reports: z.number().int(),
  tolerated: z.number().int(),
  toleratedShare: interval,
  cleared: z.number().int(),
  clearedShare: interval,
});

export const summaryDetailSchema = summarySchema.extend({
  bands: z.array(bandSchema),
  points: z.array(z.object({ dose: z.number(), tolerated: z.boolean(), cleared: z.boolean() })),
  /** Above 300 reports `points` is empty and these carry the same counts per narrow dose bin; empty at or below. */
  pointBins: z.array(
    z.object({
      from: z.number(),
      to: z.number(),
      reports: z.number().int(),
      tolerated: z.number().int(),
      cleared: z.number().int(),
    }),
  ),
  species: z.array(
    z.object({
      id: z.string().nullable(),
      commonName: z.string(),
      scientificName: z.string().nullable(),
      reports: z.number().int(),
    }),
  ),
});

export const summariesResponseSchema = z.object({
  agent: z.string(),
  unit: z.string(),
  condition: z.string().nullable(),
  confidenceLevel: z.number(),
  minReports: z.number(),
  anecdotal: z.literal(true),
  notice: z.string(),
  methodVersion: z.string(),
  groups: z.array(summarySchema),
});

/** The agent the evidence pages and the summaries API show when none is named. */
export const DEFAULT_EVIDENCE_AGENT = "hydrogen-peroxide";

export const summaryQuerySchema = z.object({
  // Optional since the evidence pages open on hydrogen peroxide too: a bare /api/summaries answers that agent.
  agent: z
    .string({ error: "agent must be an agent slug from /api/catalogue." })
    .min(1, "agent must be an agent slug from /api/catalogue, or left out for hydrogen-peroxide.")
    .default(DEFAULT_EVIDENCE_AGENT),
  condition: z.string().min(1).optional(),
});

/** Either shape, readable as `doseResponse?.bmdl` or `doseResponse?.reason` (undefined where it does not apply). */
export type DoseResponseView =
  | (DoseResponseFit & { fit?: undefined; reason?: undefined })
  | (DoseResponseNone & { [K in Exclude<keyof DoseResponseFit, "model">]?: undefined });
// Stored rows from an older method may lack doseResponse until the recompute on start: optional in the type.
type WithDoseResponse<T> = Omit<T, "doseResponse"> & { doseResponse?: DoseResponseView };
export type Summary = WithDoseResponse<z.infer<typeof summarySchema>>;
export type SummaryDetail = WithDoseResponse<z.infer<typeof summaryDetailSchema>>;
export type Band = z.infer<typeof bandSchema>;
