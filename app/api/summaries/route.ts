import { summaryQuerySchema } from "@/features/evidence";
import { getSummaries } from "@/features/evidence/server";
import { json, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Public. Served from stored summaries: no report is rescanned on a read.
export const GET = route(async (req) => {
  const q = parseQuery(req, summaryQuerySchema);
  return json(await getSummaries(q.agent, q.condition));
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
