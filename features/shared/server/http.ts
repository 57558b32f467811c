import "server-only";
import { z } from "zod";
import { AppError, type FieldIssue } from "../errors";

const MAX_JSON_BYTES = 256 * 1024;

export function json(data: unknown, init?: number | ResponseInit): Response {
  const opts = typeof init === "number" ? { status: init } : init;
  return Response.json(data, opts);
}

export function zodIssues(error: z.ZodError): FieldIssue[] {
  return error.issues.map((i) => ({
    path: i.path.map(String).join(".") || "(body)",
    message: i.message,
  }));
}

export function invalid(error: z.ZodError, message = "Some fields need fixing; see issues."): AppError {
  return new AppError("invalid", message, zodIssues(error));
}

/** Parses and validates a JSON request body; bad JSON is 400, a failed schema 422. */
export async function parseJson<S extends z.ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const type = req.headers.get("content-type") ?? "";
  if (!type.includes("application/json")) {
    throw new AppError("unsupported_type", "Send the body as JSON with Content-Type: application/json.");
  }
  const text = await readLimited(req, MAX_JSON_BYTES);
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
  const parsed = schema.safeParse(body);
  if (!parsed.success) throw invalid(parsed.error);
  return parsed.data;
}

/** Validates query parameters (all strings; schemas coerce). */
export function parseQuery<S extends z.ZodType>(req: Request, schema: S): z.infer<S> {
  const params = Object.fromEntries(new URL(req.url).searchParams.entries());
  const parsed = schema.safeParse(params);
  if (!parsed.success) throw invalid(parsed.error, "Some query parameters need fixing; see issues.");
  return parsed.data;
}

async function readLimited(req: Request, limit: number): Promise<string> {
  return (await readBody(req, limit, `The body is larger than ${limit / 1024} KB.`)).toString("utf8");
}

/** Reads a request body, refusing (413, with `message`) one larger than `limit` bytes before it is all in memory. */
export async function readBody(req: Request, limit: number, message: string): Promise<Buffer> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > limit) throw new AppError("too_large", message);
  if (!req.body) return Buffer.alloc(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      await reader.cancel();
      throw new AppError("too_large", message);
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}

/**
 * Route handlers get no cross-site check from Next.js (server actions do): refuse a state-changing
 * request whose Origin names another site.
 */
function checkOrigin(req: Request): void {
  if (req.method === "GET" || req.method === "HEAD" || req.method === "OPTIONS") return;
  const origin = req.headers.get("origin");
  if (!origin) return;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host") ?? new URL(req.url).host;
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    throw new AppError("forbidden", "The request's Origin header is not a valid address.");
  }
  if (originHost !== host) {
    throw new AppError("forbidden", "Requests that change data must come from Tanklore's own pages.");
  }
}

export function errorResponse(err: unknown): Response {
  if (err instanceof AppError) {
    return json(err.toBody(), err.status);
  }
  if (err instanceof z.ZodError) {
    const e = invalid(err);
    return json(e.toBody(), e.status);
  }
  console.error("Unexpected error in a route handler:", err);
  return json(
    { error: { code: "internal", message: "Something went wrong on our side, so we cannot confirm what happened. Reload to check whether your change was saved before trying again." } },
    500,
  );
}

type Ctx<P> = { params: Promise<P> };

/** Wraps a route handler: origin check, and every failure mapped to the error envelope. */
export function route<P = Record<string, string>>(
  handler: (req: Request, ctx: Ctx<P>) => Promise<Response>,
): (req: Request, ctx: Ctx<P>) => Promise<Response> {
  return async (req, ctx) => {
    try {
      checkOrigin(req);
      return await handler(req, ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}
