import { reportDraftSchema } from "@/features/reports";
import { createDraft } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Extension of the contract: a draft with any subset of the fields (multi-step form, open course).
export const POST = route(async (req) => {
  const actor = await requireActor(req.headers);
  return json(await createDraft(actor, await parseJson(req, reportDraftSchema)), 201);
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
