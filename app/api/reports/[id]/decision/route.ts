import { decisionSchema } from "@/features/review";
import { decideReport } from "@/features/review/server";
import { recomputeAfterChange } from "@/features/evidence/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["moderator", "admin"], "decide on reports");
  const { id } = await params;
  const result = await decideReport(actor, id, await parseJson(req, decisionSchema));
  // Only accept and retract change what counts; recompute the summaries they touch.
  if (result.status === "accepted" || result.status === "retracted") await recomputeAfterChange([{ groupSlug: result.groupSlug, agentSlug: result.agentSlug }]);
  return json({ id: result.id, status: result.status });
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
