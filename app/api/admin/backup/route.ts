import { createBackup } from "@/features/exchange/server";
import { getActor } from "@/features/members/server";
import { refuseOtherMethods, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  const { stream, fileName } = await createBackup({ actor: await getActor(req.headers) });
  return new Response(stream, {
    headers: {
      "content-type": "application/gzip",
      "content-disposition": `attachment; filename="${fileName}"`,
      // The archive holds the club's members and its session secret: never keep it in a shared cache.
      "cache-control": "no-store",
    },
  });
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
