import { correctionSchema } from "@/features/review";
import { correctReport } from "@/features/review/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Extension: a moderator maps a "not listed" species or corrects the likely cause of losses.
export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["moderator", "admin"], "correct reports");
  const { id } = await params;
  // A correction of an accepted report queues its summaries' recompute in its own transaction.
  const r = await correctReport(actor, id, await parseJson(req, correctionSchema));
  return json({ id: r.id, status: r.status });
});
