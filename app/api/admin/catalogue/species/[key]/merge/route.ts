import { mergeSpeciesInput } from "@/features/catalogue";
import { mergeSpecies } from "@/features/catalogue/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ key: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["admin"], "manage the catalogue");
  const body = await parseJson(req, mergeSpeciesInput);
  const r = await mergeSpecies(actor, (await params).key, body.into, body.note);
  return json(r);
});
