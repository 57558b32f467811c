import { z } from "zod";
import { lossCauses, reportStatuses } from "@/features/reports";

/**
 * "propose_accept" records one moderator's accept of a report flagged above the agent's plausible ceiling without
 * changing its status: a second moderator's accept then completes it (the alternative is an override note).
 */
export const decisions = ["accept", "return", "decline", "retract", "propose_accept"] as const;
export type Decision = (typeof decisions)[number];

export const decisionSchema = z
  .object({
    decision: z.enum(decisions, { error: "decision must be accept, return, decline, retract or propose_accept." }),
    note: z
      .string({ error: "note must be text." })
      .trim()
      .max(2000, "The note is at most 2000 characters.")
      .optional()
      .default(""),
  })
  .strict()
  .superRefine((d, ctx) => {
    if (d.decision !== "accept" && d.decision !== "propose_accept" && d.note.length < 3) {
      const what = {
        return: "what the member should fix",
        decline: "why the report is declined",
        retract: "why the report is retracted",
      }[d.decision];
      ctx.addIssue({ code: "custom", path: ["note"], message: `Write a note saying ${what}.` });
    }
  });

export const correctionSchema = z.discriminatedUnion(
  "kind",
  [
    z
      .object({
        kind: z.literal("species"),
        speciesId: z.string().min(1, "Choose the catalogue species."),
        note: z.string().trim().min(3, "Say why, in a short note.").max(2000),
      })
      .strict(),
    z
      .object({
        kind: z.literal("lossCause"),
        lossCause: z.enum(lossCauses, { error: "lossCause must be treatment, disease or unknown." }),
        note: z.string().trim().min(3, "Say why, in a short note.").max(2000),
      })
      .strict(),
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
  propose_accept: { from: "awaiting_review", to: "awaiting_review" },
};

/** The shortest override note that lets one moderator accept a report flagged above the agent's ceiling. */
export const overrideNoteMin = 20;

/** Every status but draft: drafts stay their author's own. */
export const listedStatuses = reportStatuses.filter((s) => s !== "draft") as Exclude<
  (typeof reportStatuses)[number],
  "draft"
>[];
export const allReportsSorts = [
  "submittedAt",
  "decidedAt",
  "startedOn",
  "status",
  "concentration",
  "species",
  "group",
  "agent",
  "member",
] as const;
const day = (field: string) =>
  z
    .string({ error: `${field} must be a date, YYYY-MM-DD.` })
    .regex(/^\d{4}-\d{2}-\d{2}$/, `${field} must be a date, YYYY-MM-DD.`)
    .refine(
      (v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v),
      `${field} is not a real date.`,
    );
const slug = (field: string) =>
  z
    .string()
    .trim()
    .min(1, `${field} must not be empty; leave it out for any.`)
    .max(100, `${field} is at most 100 characters.`);

/** GET /api/reports?scope=all: every submitted report, for moderators and admins, filtered and paged on the server. */
export const listAllQuerySchema = z
  .object({
    scope: z.literal("all", { error: "scope must be all." }),
    status: z
      .enum(listedStatuses as [string, ...string[]], { error: `status must be one of: ${listedStatuses.join(", ")}.` })
      .optional(),
    group: slug("group").optional(),
    agent: slug("agent").optional(),
    /** A member's id, or part of their name or e-mail (or of an imported report's reporter). */
    member: z
      .string()
      .trim()
      .min(1, "member must not be empty; leave it out for any.")
      .max(200, "member is at most 200 characters.")
      .optional(),
    /** Which date `from` and `to` apply to. */
    dateOf: z
      .enum(["submitted", "decided", "started"], { error: "dateOf must be submitted, decided or started." })
      .default("submitted"),
    from: day("from").optional(),
    to: day("to").optional(),
    sort: z
      .enum(allReportsSorts, { error: `sort must be one of: ${allReportsSorts.join(", ")}.` })
      .default("submittedAt"),
    dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc." }).default("desc"),
    page: z.coerce
      .number({ error: "page must be a number." })
      .int("page must be a whole number.")
      .min(1, "page starts at 1.")
      .default(1),
    pageSize: z.coerce
      .number({ error: "pageSize must be a number." })
      .int("pageSize must be a whole number.")
      .min(1, "pageSize is at least 1.")
      .max(100, "pageSize is at most 100.")
      .default(25),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ["to"], message: "to must be on or after from." });
export type ListAllQuery = z.infer<typeof listAllQuerySchema>;

export interface AllReportsRow {
  id: string;
  status: Exclude<(typeof reportStatuses)[number], "draft">;
  species: string;
  groupSlug: string | null;
  groupName: string | null;
  agentSlug: string | null;
  agentName: string | null;
  concentration: number | null;
  unit: string | null;
  startedOn: string | null;
  submittedAt: string | null;
  decidedAt: string | null;
  member: { id: string; name: string };
  isMine: boolean;
  flags: number;
  source: string;
}
