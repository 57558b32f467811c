import { cataloguePatchInputs, parseCatalogueKind as kindOf } from "@/features/catalogue";
import { deleteCatalogueEntry, updateCatalogueEntry } from "@/features/catalogue/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";
type P = { kind: string; key: string };

export const PATCH = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["admin"], "manage the catalogue");
  const { kind: k, key } = await params;
  const kind = kindOf(k);
  const body = await parseJson(req, cataloguePatchInputs[kind]);
  // Band edges, presets, groups and hiding change what summaries show: the update queues their recompute.
  const r = await updateCatalogueEntry(actor, kind, key, body as never);
  return json({ key: r.key });
});

export const DELETE = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers, ["admin"], "manage the catalogue");
  const { kind, key } = await params;
  return json(await deleteCatalogueEntry(actor, kindOf(kind), key));
});
