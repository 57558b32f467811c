import { setRoleSchema } from "@/features/members";
import {
  AUTH_BODY_LIMIT,
  assertRole,
  authPath,
  changeMemberRole,
  getActor,
  handleAuthRequest,
} from "@/features/members/server";
import {
  errorResponse,
  json,
  parseJson,
  refuseControlCharactersIn,
  refuseOtherMethods,
  route,
} from "@/features/shared/server/http";

// better-auth's own routes (sign-up, sign-in, sign-out, session, verification, password reset),
// behind the app's body, field and sign-in limits (handleAuthRequest).
async function handle(req: Request): Promise<Response> {
  try {
    return await handleAuthRequest(await refuseControlCharactersIn(req, AUTH_BODY_LIMIT));
  } catch (err) {
    return errorResponse(err);
  }
}

// The sign-in library's role route goes through the app's own rule and audit, like PATCH /api/admin/members/:id.
const setRole = route<{ all: string[] }>(async (req) => {
  const actor = await getActor(req.headers);
  assertRole(actor, ["admin"], "change members' roles");
  const body = await parseJson(req, setRoleSchema);
  return json({ user: await changeMemberRole(actor, body.userId, body.role) });
});

export const GET = handle;
export async function POST(req: Request, ctx: { params: Promise<{ all: string[] }> }): Promise<Response> {
  return authPath(req) === "/admin/set-role" ? setRole(req, ctx) : handle(req);
}
export const { PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET", "POST");
