import { exportReportsCsv } from "@/features/exchange/server";
import { requireActor } from "@/features/members/server";
import { route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  const actor = await requireActor(req.headers, ["moderator", "admin"], "export reports");
  return new Response(exportReportsCsv(actor), {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": 'attachment; filename="tanklore-reports.csv"',
    },
  });
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
