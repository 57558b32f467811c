import { queueQuerySchema } from "@/features/review";
import { getReviewQueue } from "@/features/review/server";
import { requireActor } from "@/features/members/server";
import { json, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  const actor = await requireActor(req.headers, ["moderator", "admin"], "see the review queue");
  return json(await getReviewQueue(actor, parseQuery(req, queueQuerySchema).order));
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
