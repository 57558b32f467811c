import { getAuth } from "@/features/members/server";
import { errorResponse, refuseControlCharactersIn, refuseOtherMethods } from "@/features/shared/server/http";

// better-auth's own routes (sign-up, sign-in, sign-out, session, verification, password reset).
async function handle(req: Request): Promise<Response> {
  try {
    const auth = await getAuth();
    return await auth.handler(await refuseControlCharactersIn(req));
  } catch (err) {
    return errorResponse(err);
  }
}

export const GET = handle;
export const POST = handle;
export const { PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET", "POST");
