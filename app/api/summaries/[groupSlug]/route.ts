import { summaryQuerySchema } from "@/features/evidence";
import { getSummaryDetail } from "@/features/evidence/server";
import { json, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route<{ groupSlug: string }>(async (req, { params }) => {
  const q = parseQuery(req, summaryQuerySchema);
  return json(await getSummaryDetail((await params).groupSlug, q.agent, q.condition));
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
