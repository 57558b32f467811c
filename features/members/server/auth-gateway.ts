import "server-only";
import { AppError } from "@/features/shared/errors";
import { json, readBody } from "@/features/shared/server/http";
import { EMAIL_MAX_LENGTH, NAME_MAX_LENGTH } from "../schemas";
import { getAuth } from "./auth";
import { CLIENT_ADDRESS_HEADER, clientAddress } from "./client-address";
import { clearSignInAttempts, countSignInAttempt } from "./sign-in-guard";

/** No sign-in form needs more; a larger body is refused before it is read into memory. */
export const AUTH_BODY_LIMIT = 64 * 1024;
const FIELD_LIMITS: Record<string, { max: number; label: string }> = {
  name: { max: NAME_MAX_LENGTH, label: "Name" },
  email: { max: EMAIL_MAX_LENGTH, label: "E-mail address" },
  newEmail: { max: EMAIL_MAX_LENGTH, label: "E-mail address" },
};

/** The path under /api/auth, decoded and tidied so that look-alike spellings compare equal. */
export function authPath(req: Request): string {
  let p = new URL(req.url).pathname;
  try {
    p = decodeURIComponent(p);
  } catch {
    // Not valid percent-encoding: compare it as it came.
  }
  return (
    p
      .replace(/\/{2,}/g, "/")
      .replace(/^\/api\/auth/i, "")
      .replace(/\/+$/, "")
      .toLowerCase() || "/"
  );
}

/** Refuses over-long names and addresses (422) wherever a better-auth body carries them. */
function checkFields(body: unknown): void {
  if (!body || typeof body !== "object" || Array.isArray(body)) return;
  const issues = Object.entries(FIELD_LIMITS)
    .filter(([key, { max }]) => {
      const v = (body as Record<string, unknown>)[key];
      return typeof v === "string" && v.length > max;
    })
    .map(([key, { max, label }]) => ({ path: key, message: `${label} is at most ${max} characters.` }));
  if (issues.length) throw new AppError("invalid", "Some fields need fixing; see issues.", issues);
}

/**
 * Every request to better-auth's routes passes here: a body limit, field limits, the client
 * address from the trusted-proxy setting (the only address better-auth's limiter sees), and the
 * per-account limit on password sign-in.
 */
export async function handleAuthRequest(req: Request): Promise<Response> {
  const path = authPath(req);
  // The admin plugin's routes are closed (see closedAdminPaths), however the path is spelled.
  if (path === "/admin" || path.startsWith("/admin/"))
    throw new AppError("not_found", "That sign-in route is not available.");
  const hasBody = req.method !== "GET" && req.method !== "HEAD";
  const raw = hasBody
    ? await readBody(req, AUTH_BODY_LIMIT, `The body is larger than ${AUTH_BODY_LIMIT / 1024} KB.`)
    : null;
  let body: unknown = undefined;
  if (raw && raw.length && (req.headers.get("content-type") ?? "").includes("application/json")) {
    try {
      body = JSON.parse(raw.toString("utf8"));
    } catch {
      throw new AppError("bad_request", "The request body is not valid JSON.");
    }
    checkFields(body);
  }

  const headers = new Headers(req.headers);
  headers.delete(CLIENT_ADDRESS_HEADER);
  const address = clientAddress(req.headers);
  if (address) headers.set(CLIENT_ADDRESS_HEADER, address);
  const forwarded = new Request(req.url, {
    method: req.method,
    headers,
    body: raw && raw.length ? new Uint8Array(raw) : undefined,
    redirect: "manual",
  });

  const email =
    path === "/sign-in/email" && body && typeof body === "object" ? (body as { email?: unknown }).email : undefined;
  if (typeof email === "string" && email) {
    const check = await countSignInAttempt(email);
    if (!check.allowed) {
      const minutes = Math.ceil(check.retryAfter / 60);
      return json(
        {
          error: {
            code: "rate_limited",
            message: `Too many wrong passwords for this account: password sign-in is paused for about ${minutes} minute${minutes === 1 ? "" : "s"}. To get in sooner, reset your password.`,
          },
        },
        {
          status: 429,
          headers: { "Retry-After": String(check.retryAfter), "X-Retry-After": String(check.retryAfter) },
        },
      );
    }
  }

  const auth = await getAuth();
  const res = await auth.handler(forwarded);
  // Only a completed sign-in forgives earlier misses (a 403 can also mean a refused origin).
  if (typeof email === "string" && email && res.status === 200) await clearSignInAttempts(email);
  return res;
}
