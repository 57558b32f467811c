import { NextResponse, type NextRequest } from "next/server";
import { getEnv } from "@/features/shared/env";
import { newNonce, securityHeaders, servedOverHttps } from "@/features/shared/server/security-headers";

// Security headers on every page and API answer, with a fresh script nonce per page (Next.js reads the nonce
// from the CSP header it finds on the request and puts it on its own script tags; every page renders per
// request, see app/layout.tsx). Authorization is not done here: that lives in the features' server code.
export function proxy(request: NextRequest) {
  const env = getEnv();
  const api = request.nextUrl.pathname.startsWith("/api/");
  const headers = securityHeaders({
    nonce: newNonce(),
    api,
    https: servedOverHttps(request.url, request.headers.get("x-forwarded-proto"), env.BETTER_AUTH_URL),
    dev: env.NODE_ENV === "development",
  });
  let response: NextResponse;
  if (api) {
    response = NextResponse.next();
  } else {
    const forwarded = new Headers(request.headers);
    forwarded.set("content-security-policy", headers["content-security-policy"]!);
    // The page's own address, for the sign-in redirect of a members' layout (never trusted from the client).
    forwarded.set("x-tanklore-page-path", request.nextUrl.pathname + request.nextUrl.search);
    response = NextResponse.next({ request: { headers: forwarded } });
  }
  for (const [name, value] of Object.entries(headers)) response.headers.set(name, value);
  return response;
}

export const config = {
  // Built assets are immutable files with their own content types; everything else is answered per request.
  matcher: ["/((?!_next/static|_next/image|favicon.ico).*)"],
};
