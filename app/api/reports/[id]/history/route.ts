import { getReportHistory } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  return json(await getReportHistory(actor, (await params).id));
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
