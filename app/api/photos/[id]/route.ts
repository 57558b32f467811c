import { getPhotoFile, removePhoto } from "@/features/photos/server";
import { requireActor } from "@/features/members/server";
import { AppError } from "@/features/shared/errors";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";
type P = { id: string };

export const GET = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  const size = new URL(req.url).searchParams.get("size") ?? "full";
  if (size !== "thumb" && size !== "full") {
    throw new AppError("invalid", "Some query parameters need fixing; see issues.", [
      { path: "size", message: "size must be thumb or full." },
    ]);
  }
  const data = await getPhotoFile(actor, (await params).id, size);
  return new Response(new Uint8Array(data), {
    headers: {
      "content-type": "image/jpeg",
      "cache-control": "private, max-age=3600",
      "x-content-type-options": "nosniff",
      "content-length": String(data.length),
    },
  });
});

export const DELETE = route<P>(async (req, { params }) => {
  const actor = await requireActor(req.headers);
  return json(await removePhoto(actor, (await params).id));
});

export const { POST, PUT, PATCH, OPTIONS } = refuseOtherMethods("GET", "DELETE");
