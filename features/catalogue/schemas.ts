import { z } from "zod";

export const stockFormSchema = z.object({
  id: z.string(),
  label: z.string(),
  percent: z.number(),
  basis: z.enum(["w/v", "w/w"]),
  densityGPerMl: z.number().nullable(),
  activeFraction: z.number(),
  /** What the percentage is of when a compound; null: the agent's own measure. */
  compound: z.string().nullable(),
});

export const agentSchema = z.object({
  slug: z.string(),
  name: z.string(),
  unit: z.enum(["mg/L", "g/L"]),
  bandEdges: z.array(z.number()),
  plausibleCeiling: z.number(),
  redoseHours: z.number().nullable(),
  watchDays: z.number(),
  description: z.string(),
  stockForms: z.array(stockFormSchema),
});

export const catalogueSchema = z.object({
  speciesGroups: z.array(z.object({ slug: z.string(), name: z.string(), description: z.string() })),
  species: z.array(
    z.object({ id: z.string(), scientificName: z.string(), commonName: z.string(), groupSlug: z.string() }),
  ),
  agents: z.array(agentSchema),
  conditions: z.array(z.object({ slug: z.string(), name: z.string() })),
});

export type Catalogue = z.infer<typeof catalogueSchema>;
export type CatalogueAgent = z.infer<typeof agentSchema>;
export type CatalogueStockForm = z.infer<typeof stockFormSchema>;
