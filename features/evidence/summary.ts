import { z } from "zod";

export const METHOD_VERSION = "2026.12-1";
export const ANECDOTAL_TEXT =
  "Anecdotal evidence: members' own reports of treatments in their own tanks, checked by club moderators for plausibility only. Not veterinary advice; defer to an aquatic veterinarian and to local rules.";

const interval = z.object({ value: z.number().nullable(), low: z.number().nullable(), high: z.number().nullable() });

export const summarySchema = z.object({
  group: z.object({ slug: z.string(), name: z.string() }),
  reports: z.number().int(),
  members: z.number().int(),
  fish: z.number().int(),
  tolerated: z.number().int(),
  toleratedShare: interval,
  toleratedDose: z.object({
    min: z.number().nullable(), p10: z.number().nullable(), p25: z.number().nullable(), median: z.number().nullable(),
    p75: z.number().nullable(), p90: z.number().nullable(), max: z.number().nullable(),
    medianInterval: z.object({ low: z.number(), high: z.number(), coverage: z.number() }).nullable(),
  }),
  lowestAdverseDose: z.number().nullable(),
  sparse: z.boolean(),
});

export const bandSchema = z.object({
  from: z.number(), to: z.number().nullable(), reports: z.number().int(), tolerated: z.number().int(), toleratedShare: interval, cleared: z.number().int(), clearedShare: interval,
});

export const summaryDetailSchema = summarySchema.extend({
  bands: z.array(bandSchema),
  points: z.array(z.object({ dose: z.number(), tolerated: z.boolean(), cleared: z.boolean() })),
  species: z.array(z.object({ id: z.string().nullable(), commonName: z.string(), scientificName: z.string().nullable(), reports: z.number().int() })),
});

export const summariesResponseSchema = z.object({
  agent: z.string(), unit: z.string(), condition: z.string().nullable(), confidenceLevel: z.number(), minReports: z.number(), anecdotal: z.literal(true), notice: z.string(), methodVersion: z.string(),
  groups: z.array(summarySchema),
});

export const summaryQuerySchema = z.object({
  agent: z.string({ error: "agent is required: an agent slug from /api/catalogue." }).min(1, "agent is required."),
  condition: z.string().min(1).optional(),
});

export type Summary = z.infer<typeof summarySchema>;
export type SummaryDetail = z.infer<typeof summaryDetailSchema>;
export type Band = z.infer<typeof bandSchema>;
