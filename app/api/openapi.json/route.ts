import { z } from "zod";
import { catalogueSchema } from "@/features/catalogue";
import { doseQuerySchema, doseResponseSchema } from "@/features/dosing";
import { changeRoleSchema, listMembersQuerySchema, memberListSchema, memberSchema } from "@/features/members";
import { json, route } from "@/features/shared/server/http";
import { buildOpenApi, type Operation } from "@/features/shared/server/openapi";

export const dynamic = "force-static";

const operations: Operation[] = [
  {
    method: "get", path: "/api/health", summary: "Service and database status", tags: ["health"],
    response: z.object({ status: z.literal("ok"), database: z.enum(["pglite", "postgres"]) }), errors: [],
  },
  { method: "get", path: "/api/catalogue", summary: "Species groups, species, agents with stock presets, conditions", tags: ["catalogue"], response: catalogueSchema, errors: [] },
  {
    method: "get", path: "/api/dose", summary: "Dose planner: mL of stock for a target, or the concentration a given mL makes", tags: ["dosing"],
    query: doseQuerySchema, response: doseResponseSchema, errors: [422],
  },
  {
    method: "get", path: "/api/admin/members", summary: "List members (search, role filter, sort, pages)", tags: ["members"], auth: "admin",
    query: listMembersQuerySchema, response: memberListSchema, errors: [401, 403, 422],
  },
  {
    method: "patch", path: "/api/admin/members/{id}", summary: "Change a member's role (recorded)", tags: ["members"], auth: "admin",
    body: changeRoleSchema, response: z.object({ member: memberSchema }), errors: [401, 403, 404, 409, 422],
  },
];

export const GET = route(async () =>
  json(
    buildOpenApi(operations, {
      title: "Tanklore API",
      version: "1",
      description: "A club's moderated registry of fish-treatment outcomes. Sign-in routes are better-auth's own, under /api/auth/*.",
    }),
  ),
);
