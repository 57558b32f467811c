import { addPhoto, readUpload } from "@/features/photos/server";
import { requireActor } from "@/features/members/server";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const { id } = await params;
  const { file, stage } = await readUpload(req);
  return json(await addPhoto(actor, id, file, stage), 201);
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
