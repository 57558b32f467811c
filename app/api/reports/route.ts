import { listMineQuerySchema, reportInputSchema } from "@/features/reports";
import { createReport, getReportsByAuthorId } from "@/features/reports/server";
import { listAllReports } from "@/features/review/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";
import { idempotent } from "@/features/shared/server/idempotency";

export const dynamic = "force-dynamic";

export const POST = route(async (req) => {
  const actor = await requireActor(req.headers);
  const body = await parseJson(req, reportInputSchema);
  return idempotent(req, actor.id, body, 201, (claim) => createReport(actor, body, claim));
});

export const GET = route(async (req) => {
  const actor = await requireActor(req.headers);
  const params = Object.fromEntries(new URL(req.url).searchParams.entries());
  // Every submitted report, for moderators and admins (the feature checks the role, then the parameters).
  if (params.scope === "all") return json(await listAllReports({ actor, params }));
  return json(await getReportsByAuthorId(actor, parseQuery(req, listMineQuerySchema)));
});

export const { PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET", "POST");
