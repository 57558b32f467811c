import crypto from "node:crypto";
import { addPhoto, readUpload } from "@/features/photos/server";
import { requireActor } from "@/features/members/server";
import { route, refuseOtherMethods } from "@/features/shared/server/http";
import { idempotent } from "@/features/shared/server/idempotency";

export const dynamic = "force-dynamic";

export const POST = route<{ id: string }>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const { id } = await params;
  const { file, stage } = await readUpload(req);
  const content = { stage, file: crypto.createHash("sha256").update(file).digest("hex") };
  return idempotent(req, actor.id, content, 201, (claim) => addPhoto(actor, id, file, stage, claim));
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
