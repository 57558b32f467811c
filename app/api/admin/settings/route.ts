import { clubSettingsPatchSchema } from "@/features/catalogue";
import { changeClubSettings } from "@/features/catalogue/server";
import { recomputeAll } from "@/features/evidence/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const PATCH = route(async (req) => {
  // Refuse other roles before reading the body, so they learn nothing from validation messages.
  const actor = await requireActor(req.headers, ["admin"], "change the club's settings");
  const body = await parseJson(req, clubSettingsPatchSchema);
  const settings = await changeClubSettings(actor, body);
  // The confidence level and the minimum change every summary; the other settings change none.
  const recomputed = body.confidenceLevel !== undefined || body.minReports !== undefined ? await recomputeAll() : 0;
  return json({ settings, recomputed });
});
