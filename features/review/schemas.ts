import { z } from "zod";
import { lossCauses } from "@/features/reports";

export const decisions = ["accept", "return", "decline", "retract"] as const;
export type Decision = (typeof decisions)[number];

export const decisionSchema = z
  .object({
    decision: z.enum(decisions, { error: "decision must be accept, return, decline or retract." }),
    note: z.string({ error: "note must be text." }).trim().max(2000, "The note is at most 2000 characters.").optional().default(""),
  })
  .strict()
  .superRefine((d, ctx) => {
    if (d.decision !== "accept" && d.note.length < 3) {
      const what = { return: "what the member should fix", decline: "why the report is declined", retract: "why the report is retracted" }[d.decision];
      ctx.addIssue({ code: "custom", path: ["note"], message: `Write a note saying ${what}.` });
    }
  });

export const correctionSchema = z.discriminatedUnion(
  "kind",
  [
    z.object({ kind: z.literal("species"), speciesId: z.string().min(1, "Choose the catalogue species."), note: z.string().trim().min(3, "Say why, in a short note.").max(2000) }).strict(),
    z.object({ kind: z.literal("lossCause"), lossCause: z.enum(lossCauses, { error: "lossCause must be treatment, disease or unknown." }), note: z.string().trim().min(3, "Say why, in a short note.").max(2000) }).strict(),
  ],
  { error: "kind must be species or lossCause." },
);

export const queueQuerySchema = z.object({
  order: z.enum(["oldest", "completeness"], { error: "order must be oldest or completeness." }).default("oldest"),
});

export type DecisionInput = z.infer<typeof decisionSchema>;
export type CorrectionInput = z.infer<typeof correctionSchema>;

export const decisionStatus: Record<Decision, { from: string; to: string }> = {
  accept: { from: "awaiting_review", to: "accepted" },
  return: { from: "awaiting_review", to: "returned" },
  decline: { from: "awaiting_review", to: "declined" },
  retract: { from: "accepted", to: "retracted" },
};
