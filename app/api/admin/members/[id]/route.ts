import { changeRoleSchema } from "@/features/members";
import { changeMemberRole, getActor } from "@/features/members/server";
import { json, parseJson, route, refuseOtherMethods } from "@/features/shared/server/http";
import { assertRole } from "@/features/members/server";

export const dynamic = "force-dynamic";

export const PATCH = route<{ id: string }>(async (req, { params }) => {
  const actor = await getActor(req.headers);
  assertRole(actor, ["admin"], "change members' roles");
  const { id } = await params;
  const body = await parseJson(req, changeRoleSchema);
  return json({ member: await changeMemberRole(actor, id, body.role) });
});

export const { GET, POST, PUT, DELETE, OPTIONS } = refuseOtherMethods("PATCH");
