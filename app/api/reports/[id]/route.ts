import { reportDraftSchema } from "@/features/reports";
import { deleteDraft, getReportById, updateReport } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";
type P = { id: string };

export const GET = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  return json(await getReportById(actor, (await params).id));
});

export const PATCH = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const { id } = await params;
  return json(await updateReport(actor, id, await parseJson(req, reportDraftSchema)));
});

export const DELETE = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  return json(await deleteDraft(actor, (await params).id));
});

export const { POST, PUT, OPTIONS } = refuseOtherMethods("GET", "PATCH", "DELETE");
