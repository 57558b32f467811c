import { z } from "zod";
import { catalogueSchema } from "@/features/catalogue";
import { doseQuerySchema, doseResponseSchema, planIcsQuerySchema } from "@/features/dosing";
import { courseEntrySchema, listMineQuerySchema, reportDraftSchema, reportInputSchema } from "@/features/reports";
import { correctionSchema, decisionSchema, queueQuerySchema } from "@/features/review";
import { summariesResponseSchema, summaryDetailSchema, summaryQuerySchema, summarySchema } from "@/features/evidence";
import { catalogueInputs, clubSettingsPatchSchema, mergeSpeciesInput } from "@/features/catalogue";
import { changeRoleSchema, listMembersQuerySchema, memberListSchema, memberSchema } from "@/features/members";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";
import { importQuerySchema, importResponseSchema } from "@/features/exchange";
import { buildOpenApi, type Operation } from "@/features/shared/server/openapi";

export const dynamic = "force-static";

const operations: Operation[] = [
  {
    method: "get",
    path: "/api/health",
    summary: "Service and database status",
    tags: ["health"],
    response: z.object({ status: z.literal("ok"), database: z.enum(["pglite", "postgres"]) }),
    errors: [],
  },
  {
    method: "get",
    path: "/api/catalogue",
    summary: "Species groups, species, agents with stock presets, conditions",
    tags: ["catalogue"],
    response: catalogueSchema,
    errors: [],
  },
  {
    method: "get",
    path: "/api/dose",
    summary:
      "Dose planner: mL of stock for a target, or the concentration a given mL makes; with speciesId or group, that group's evidence and a cautious first dose",
    tags: ["dosing"],
    // The evidence is the group's full Summary; dosing cannot name the evidence schema, so it is filled in here.
    query: doseQuerySchema,
    response: doseResponseSchema.extend({ evidence: summarySchema.optional() }),
    errors: [422],
  },
  {
    method: "get",
    path: "/api/dose/plan.ics",
    summary:
      "The dosing and watching plan as iCalendar: one event per dose (mL and concentration) and per check, cautions in each description",
    tags: ["dosing"],
    query: planIcsQuerySchema,
    response: z.string(),
    contentType: "text/calendar",
    errors: [422],
  },
  {
    method: "get",
    path: "/api/admin/members",
    summary: "List members (search, role filter, sort, pages)",
    tags: ["members"],
    auth: "admin",
    query: listMembersQuerySchema,
    response: memberListSchema,
    errors: [401, 403, 422],
  },
  {
    method: "patch",
    path: "/api/admin/members/{id}",
    summary: "Change a member's role (recorded)",
    tags: ["members"],
    auth: "admin",
    body: changeRoleSchema,
    response: z.object({ member: memberSchema }),
    errors: [401, 403, 404, 409, 422],
  },
  {
    method: "patch",
    path: "/api/admin/settings",
    summary:
      "Change any of the club's settings (recorded; a new confidence level or minimum queues every summary for recompute)",
    tags: ["settings"],
    auth: "admin",
    body: clubSettingsPatchSchema,
    response: z.object({ settings: z.object({ name: z.string(), nightlyBackup: z.boolean() }).loose() }),
    errors: [400, 401, 403, 415, 422],
  },
  {
    method: "get",
    path: "/api/admin/backup",
    summary:
      "A consistent archive of the running club (application/gzip: database, photos, secret, manifest); restore with npm run restore",
    tags: ["settings"],
    auth: "admin",
    response: z.string(),
    errors: [401, 403],
  },
  {
    method: "post",
    path: "/api/reports",
    summary:
      "File a complete report (as a draft, or submitted at once with submit: true); an Idempotency-Key header makes a repeat within 24 h answer the first response",
    tags: ["reports"],
    auth: "member",
    body: reportInputSchema,
    status: 201,
    response: z.object({
      id: z.string(),
      status: z.enum(["draft", "awaiting_review"]),
      concentration: z.number().nullable(),
    }),
    errors: [401, 422],
  },
  {
    method: "get",
    path: "/api/reports",
    summary:
      "The caller's reports (scope=mine), sorted and paged; with scope=all, every submitted report for moderators and admins (filters status, group, agent, member, dateOf, from, to; members get 403)",
    tags: ["reports"],
    auth: "member",
    query: listMineQuerySchema,
    response: z.object({
      reports: z.array(z.object({ id: z.string(), status: z.string() }).loose()),
      total: z.number(),
    }),
    errors: [401, 403, 422],
  },
  {
    method: "post",
    path: "/api/reports/drafts",
    summary: "Start a draft with any subset of the fields (multi-step form, open course)",
    tags: ["reports"],
    auth: "member",
    body: reportDraftSchema,
    status: 201,
    response: z.object({ id: z.string(), status: z.string() }),
    errors: [401, 422],
  },
  {
    method: "get",
    path: "/api/reports/{id}",
    summary: "One report (its author; moderators once submitted)",
    tags: ["reports"],
    auth: "member",
    response: z.object({ id: z.string() }).loose(),
    errors: [401, 404],
  },
  {
    method: "patch",
    path: "/api/reports/{id}",
    summary: "Change a draft or returned report (nested objects merged)",
    tags: ["reports"],
    auth: "member",
    body: reportDraftSchema,
    response: z.object({ id: z.string(), status: z.string() }),
    errors: [401, 403, 404, 409, 422],
  },
  {
    method: "delete",
    path: "/api/reports/{id}",
    summary: "Delete a draft",
    tags: ["reports"],
    auth: "member",
    response: z.object({ id: z.string(), deleted: z.boolean() }),
    errors: [401, 404, 409],
  },
  {
    method: "post",
    path: "/api/reports/{id}/submit",
    summary: "Submit for review",
    tags: ["reports"],
    auth: "member",
    response: z.object({ id: z.string(), status: z.string() }),
    errors: [401, 404, 409, 422],
  },
  {
    method: "get",
    path: "/api/reports/{id}/history",
    summary: "The report's audit trail",
    tags: ["reports"],
    auth: "member",
    response: z.object({ events: z.array(z.object({ at: z.string(), action: z.string() }).loose()) }),
    errors: [401, 404],
  },
  {
    method: "post",
    path: "/api/reports/{id}/entries",
    summary: "Log a dose or observation on an open course",
    tags: ["reports"],
    auth: "member",
    body: courseEntrySchema,
    status: 201,
    response: z.object({ id: z.number() }).loose(),
    errors: [401, 404, 409, 422],
  },
  {
    method: "post",
    path: "/api/reports/{id}/photos",
    summary:
      "Add a photo (multipart/form-data, field file; JPEG, PNG, WebP or AVIF, ≤ 10 MB, ≤ 40 MP); Idempotency-Key as on POST /api/reports",
    tags: ["photos"],
    auth: "member",
    status: 201,
    response: z.object({ id: z.string(), width: z.number(), height: z.number(), bytes: z.number() }),
    errors: [401, 404, 409, 413, 415],
  },
  {
    method: "get",
    path: "/api/review/queue",
    summary: "Reports awaiting review with their plausibility flags",
    tags: ["review"],
    auth: "moderator",
    query: queueQuerySchema,
    response: z.object({
      reports: z.array(
        z.object({ id: z.string(), flags: z.array(z.object({ code: z.string(), message: z.string() })) }).loose(),
      ),
    }),
    errors: [401, 403],
  },
  {
    method: "post",
    path: "/api/reports/{id}/decision",
    summary: "Accept, return, decline or retract (note required except for accept)",
    tags: ["review"],
    auth: "moderator",
    body: decisionSchema,
    response: z.object({ id: z.string(), status: z.string() }),
    errors: [401, 403, 404, 409, 422],
  },
  {
    method: "post",
    path: "/api/reports/{id}/corrections",
    summary: "Map a not-listed species or correct the likely cause of losses",
    tags: ["review"],
    auth: "moderator",
    body: correctionSchema,
    response: z.object({ id: z.string(), status: z.string() }),
    errors: [401, 403, 404, 409, 422],
  },
  {
    method: "get",
    path: "/api/summaries",
    summary: "Per-group summaries for an agent (anecdotal)",
    tags: ["evidence"],
    query: summaryQuerySchema,
    response: summariesResponseSchema,
    errors: [422],
  },
  {
    method: "get",
    path: "/api/summaries/{groupSlug}",
    summary: "One group's summary with bands, anonymous points and species",
    tags: ["evidence"],
    query: summaryQuerySchema,
    response: summaryDetailSchema,
    errors: [404, 422],
  },
  {
    method: "get",
    path: "/api/export/summaries.csv",
    summary: "The summaries as CSV, the anecdotal notice inside",
    tags: ["exchange"],
    query: summaryQuerySchema,
    response: z.string(),
    errors: [422],
  },
  {
    method: "get",
    path: "/api/export/reports.csv",
    summary: "Submitted reports as CSV, reporters pseudonymised",
    tags: ["exchange"],
    auth: "moderator",
    response: z.string(),
    errors: [401, 403],
  },
  {
    method: "post",
    path: "/api/import/reports",
    summary:
      "Import reports from CSV (text/csv, the export's columns): rows already here are skipped; a file with rejected rows imports nothing unless partial=1; dryRun=1 writes nothing; Accept: application/x-ndjson streams progress",
    tags: ["exchange"],
    auth: "admin",
    query: importQuerySchema,
    response: importResponseSchema,
    errors: [401, 403, 413, 415, 422],
  },
  {
    method: "post",
    path: "/api/admin/catalogue/{kind}",
    summary:
      "Add a catalogue entry (kind: groups, species, agents, conditions, stock-forms); body per kind — agents shown",
    tags: ["catalogue"],
    auth: "admin",
    body: catalogueInputs.agents,
    status: 201,
    response: z.object({ key: z.string() }),
    errors: [401, 403, 404, 409, 422],
  },
  {
    method: "post",
    path: "/api/admin/catalogue/species/{key}/merge",
    summary: "Merge a species into another (its reports move)",
    tags: ["catalogue"],
    auth: "admin",
    body: mergeSpeciesInput,
    response: z.object({ key: z.string(), into: z.string(), reportsMoved: z.number() }),
    errors: [401, 403, 404, 422],
  },
];

export const GET = route(async () =>
  json(
    buildOpenApi(operations, {
      title: "Tanklore API",
      version: "1",
      description:
        "A club's moderated registry of fish-treatment outcomes. Sign-in routes are better-auth's own, under /api/auth/*.",
    }),
  ),
);

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
