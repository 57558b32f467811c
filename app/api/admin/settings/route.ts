import { clubSettingsPatchSchema } from "@/features/catalogue";
import { updateClubSettings } from "@/features/catalogue/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, refuseOtherMethods, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const PATCH = route(async (req) => {
  // Refuse other roles before reading the body, so they learn nothing from validation messages.
  const actor = await requireActor(req.headers, ["admin"], "change the club's settings");
  const body = await parseJson(req, clubSettingsPatchSchema);
  // A change of the confidence level or the minimum queues every summary for recompute in the same transaction.
  return json({ settings: await updateClubSettings(actor, body) });
});

export const { GET, POST, PUT, DELETE, OPTIONS } = refuseOtherMethods("PATCH");
