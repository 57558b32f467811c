import { decisionSchema } from "@/features/review";
import { decideReport } from "@/features/review/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["moderator", "admin"], "decide on reports");
  const { id } = await params;
  // An accept or retract queues its summaries' recompute in the decision's own transaction (the evidence worker).
  const result = await decideReport(actor, id, await parseJson(req, decisionSchema));
  return json({ id: result.id, status: result.status });
});
