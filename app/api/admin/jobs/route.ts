import { z } from "zod";
// The rounds' jobs register when their features load: this route can run any of them.
import "@/features/reports/server";
import "@/features/review/server";
import "@/features/exchange/server";
import { requireActor } from "@/features/members/server";
import { json, parseJson, refuseOtherMethods, route } from "@/features/shared/server/http";
import { adminJobAction, listJobs } from "@/features/shared/server/jobs";

export const dynamic = "force-dynamic";

/** Background jobs for admins: counts by kind and status, the rounds, and every job with an error. */
export const GET = route(async (req) => {
  const actor = await requireActor(req.headers, ["admin"], "see the background jobs");
  return json(await listJobs({ actor }));
});

const actionSchema = z.union([
  z.strictObject({ run: z.string().min(1, "run names a round, for example moderator-digest.") }),
  z.strictObject({ retry: z.string().min(1, "retry names a failed job's id.") }),
]);

/** { "run": "moderator-digest" } runs a round now; { "retry": id } queues a failed job again. */
export const POST = route(async (req) => {
  const actor = await requireActor(req.headers, ["admin"], "run background jobs");
  const body = await parseJson(req, actionSchema);
  return json(await adminJobAction({ actor }, body));
});

export const { PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET", "POST");
