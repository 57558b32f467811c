import { importReportsCsv } from "@/features/exchange/server";
import { recomputeAfterChange } from "@/features/evidence/server";
import { requireActor } from "@/features/members/server";
import { AppError } from "@/features/shared/errors";
import { json, readBody, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const POST = route(async (req) => {
  const actor = await requireActor(req.headers, ["admin"], "import reports");
  if (!(req.headers.get("content-type") ?? "").startsWith("text/csv")) {
    throw new AppError("unsupported_type", "Send the file as text/csv, with the columns of the reports export.");
  }
  const text = (await readBody(req, 20 * 1024 * 1024, "The file is larger than 20 MB; split it.")).toString("utf8");
  const result = await importReportsCsv(actor, text);
  await recomputeAfterChange(result.touched);
  return json({ imported: result.imported, rejected: result.rejected });
});

export const { GET, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("POST");
