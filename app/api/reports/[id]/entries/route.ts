import { courseEntrySchema } from "@/features/reports";
import { addCourseEntry } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { groupSummary } from "@/features/evidence/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const { id } = await params;
  return json(
    await addCourseEntry(actor, id, await parseJson(req, courseEntrySchema), { loadEvidence: groupSummary }),
    201,
  );
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
