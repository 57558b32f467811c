import { courseEntryPatchSchema } from "@/features/reports";
import { correctCourseEntry } from "@/features/reports/server";
import { requireActor } from "@/features/members/server";
import { groupSummary } from "@/features/evidence/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

/** Corrects a course entry or strikes it out (`{ struck: true, note }`); the change goes into the report's history. */
export const PATCH = route<{ id: string; entryId: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const { id, entryId } = await params;
  return json(
    await correctCourseEntry(actor, id, entryId, await parseJson(req, courseEntryPatchSchema), {
      loadEvidence: groupSummary,
    }),
  );
});

export const { GET, POST, PUT, DELETE, OPTIONS } = refuseOtherMethods("PATCH");
