import { z } from "zod";

const flag = z
  .enum(["0", "1", "true", "false"], { error: "Use 1 or 0." })
  .optional()
  .transform((v) => v === "1" || v === "true");

/** POST /api/import/reports query: ?dryRun=1 checks and counts only; ?partial=1 keeps the good rows of a file with rejected ones. */
export const importQuerySchema = z.object({ dryRun: flag, partial: flag }).strict();

const issue = z.object({ path: z.string(), message: z.string() });

export const importResponseSchema = z.object({
  imported: z.number(),
  skipped: z.number(),
  rejected: z.array(z.object({ row: z.number(), issues: z.array(issue) })),
  touched: z.array(z.object({ group: z.string().nullable(), agent: z.string().nullable() })),
  dryRun: z.boolean().optional(),
});
