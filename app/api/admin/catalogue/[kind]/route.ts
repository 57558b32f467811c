import { catalogueInputs, parseCatalogueKind as kindOf } from "@/features/catalogue";
import { createCatalogueEntry, listCatalogue } from "@/features/catalogue/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route<{ kind: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["admin"], "manage the catalogue");
  return json(await listCatalogue(actor, kindOf((await params).kind)));
});

export const POST = route<{ kind: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["admin"], "manage the catalogue");
  const kind = kindOf((await params).kind);
  const body = await parseJson(req, catalogueInputs[kind]);
  const r = await createCatalogueEntry(actor, kind, body as never);
  return json(r, 201);
});
