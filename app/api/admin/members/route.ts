import { listMembersQuerySchema } from "@/features/members";
import { getMembers, requireActor } from "@/features/members/server";
import { json, parseQuery, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  const actor = await requireActor(req.headers, ["admin"], "list the club's members");
  const query = parseQuery(req, listMembersQuerySchema);
  return json(await getMembers({ actor }, query));
});
