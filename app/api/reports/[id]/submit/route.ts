import { submitReport } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  return json(await submitReport(actor, (await params).id));
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
