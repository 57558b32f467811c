import "server-only";
import { z } from "zod";
import { AppError, type FieldIssue } from "../errors";
import { publicBaseUrl } from "../env";

const MAX_JSON_BYTES = 256 * 1024;

/**
 * C0 control characters other than tab, line feed and carriage return (text from Windows keeps its CRs and they
 * do no harm), and DEL. None belongs in a club's text; NUL cannot even be stored in a PostgreSQL text column.
 */
// eslint-disable-next-line no-control-regex -- matching control characters is the point
const CONTROL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;
// eslint-disable-next-line no-control-regex -- as above
const CONTROL_ALL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/g;
const MAX_CONTROL_ISSUES = 50;

const codePoint = (ch: string) => `U+${ch.charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")}`;
/** A field name as it can be shown in an issue's path: control characters written out. */
const printable = (key: string) =>
  key.replace(CONTROL_ALL, (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, "0")}`);

/**
 * Every string (and object key) in a parsed JSON value that holds a control character, as field issues.
 * Walks with its own stack: a deeply nested body must not overflow the call stack.
 */
export function controlCharacterIssues(value: unknown, root = ""): FieldIssue[] {
  const issues: FieldIssue[] = [];
  const stack: { v: unknown; path: string; badName?: string }[] = [{ v: value, path: root }];
  while (stack.length > 0 && issues.length < MAX_CONTROL_ISSUES) {
    const { v, path, badName } = stack.pop()!;
    if (badName) {
      issues.push({ path, message: `Remove the control character ${codePoint(badName)} from this field's name.` });
    } else if (typeof v === "string") {
      const m = CONTROL.exec(v);
      if (m)
        issues.push({
          path: path || "(body)",
          message: `Remove the control character ${codePoint(m[0])}: text may hold tabs and line breaks, no other control characters.`,
        });
    } else if (v !== null && typeof v === "object") {
      const entries = Array.isArray(v) ? v.map((x, i) => [String(i), x] as const) : Object.entries(v);
      // Reversed onto the stack, so issues come out in the body's order.
      for (let i = entries.length - 1; i >= 0; i--) {
        const [k, x] = entries[i]!;
        const at = path ? `${path}.${printable(k)}` : printable(k);
        stack.push({ v: x, path: at, badName: CONTROL.exec(k)?.[0] });
      }
    }
  }
  return issues;
}

function refuseControlCharacters(body: unknown): void {
  const issues = controlCharacterIssues(body);
  if (issues.length > 0) throw new AppError("invalid", "Some fields hold control characters; see issues.", issues);
}

/** Issues for URL-encoded parameters (a query or a form body); a repeated name is checked in every copy. */
function parameterIssues(params: URLSearchParams): FieldIssue[] {
  // No prototype: a parameter named __proto__ is a parameter like any other.
  const values: Record<string, string[]> = Object.create(null);
  for (const [k, v] of params) (values[k] ??= []).push(v);
  // The walk sees each name's list of copies; the issue names the parameter, not the copy.
  return controlCharacterIssues(values).map((i) => ({ ...i, path: i.path.replace(/\.\d+$/, "") }));
}

function refuseControlCharactersInQuery(req: Request): void {
  const issues = parameterIssues(new URL(req.url).searchParams);
  if (issues.length > 0)
    throw new AppError("invalid", "Some query parameters hold control characters; see issues.", issues);
}

export function json(data: unknown, init?: number | ResponseInit): Response {
  const opts = typeof init === "number" ? { status: init } : init;
  return Response.json(data, opts);
}

export function zodIssues(error: z.ZodError): FieldIssue[] {
  return error.issues.flatMap((i) => {
    const path = i.path.map(String);
    // An unknown field, at any depth, is named by its own path so the caller sees exactly what to remove.
    if (i.code === "unrecognized_keys") {
      return i.keys.map((k) => ({
        path: [...path, printable(k)].join("."),
        message: `There is no field "${printable(k)}" here; remove it.`,
      }));
    }
    return [{ path: path.join(".") || "(body)", message: i.message }];
  });
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
  refuseControlCharacters(body);
  const parsed = schema.safeParse(body);
  if (!parsed.success) throw invalid(parsed.error);
  return parsed.data;
}

/** Validates query parameters (all strings; schemas coerce). */
export function parseQuery<S extends z.ZodType>(req: Request, schema: S): z.infer<S> {
  refuseControlCharactersInQuery(req);
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

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
/** better-auth's session cookies (`better-auth.session_token`, `…session_data`; `__Secure-` prefixed on https). */
const SESSION_COOKIE = /(?:^|;)\s*(?:__Secure-|__Host-)?[\w.-]*\.session_(?:token|data)=/;

function hostOf(url: string): string | null {
  try {
    return new URL(url).host;
  } catch {
    return null;
  }
}

/** The hosts this server answers as: the request's own (as forwarded by a proxy) and the configured public address. */
function ownHosts(req: Request): Set<string> {
  const hosts = new Set<string>([new URL(req.url).host]);
  const forwarded = req.headers.get("x-forwarded-host")?.split(",")[0]?.trim();
  if (forwarded) hosts.add(forwarded);
  const host = req.headers.get("host");
  if (host) hosts.add(host);
  const configured = hostOf(publicBaseUrl());
  if (configured) hosts.add(configured);
  return hosts;
}

/**
 * Route handlers get no cross-site check from Next.js (server actions do). A state-changing request whose
 * Origin names another site is refused; one that carries a session cookie must show this site's Origin (or
 * `Sec-Fetch-Site: same-origin`), which every current browser sends, so a cross-site form or a browser that
 * hides the Origin cannot act with the member's session. Scripts without a session cookie are not affected.
 */
export function checkOrigin(req: Request): void {
  if (SAFE_METHODS.has(req.method)) return;
  const origin = req.headers.get("origin");
  if (origin && origin !== "null") {
    const originHost = hostOf(origin);
    if (originHost === null) throw new AppError("forbidden", "The request's Origin header is not a valid address.");
    if (!ownHosts(req).has(originHost))
      throw new AppError("forbidden", "Requests that change data must come from Tanklore's own pages.");
    return;
  }
  if (!SESSION_COOKIE.test(req.headers.get("cookie") ?? "")) return;
  if (req.headers.get("sec-fetch-site") === "same-origin") return;
  throw new AppError(
    "forbidden",
    "A request that changes data with a session cookie must carry an Origin header naming this site (browsers send it themselves).",
  );
}

/** Path parameters come from the URL, decoded: one holding a control character cannot name anything here. */
function refuseControlCharactersInParams(params: unknown): void {
  if (controlCharacterIssues(params).length > 0) {
    throw new AppError("not_found", "Nothing here has that address: a part of the path holds a control character.");
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
    {
      error: {
        code: "internal",
        message:
          "Something went wrong on our side, so we cannot confirm what happened. Reload to check whether your change was saved before trying again.",
      },
    },
    500,
  );
}

type Ctx<P> = { params: Promise<P> };

/**
 * Wraps a route handler: origin check, control characters refused in the query (422) and the path (404),
 * and every failure mapped to the error envelope.
 */
export function route<P = Record<string, string>>(
  handler: (req: Request, ctx: Ctx<P>) => Promise<Response>,
): (req: Request, ctx: Ctx<P>) => Promise<Response> {
  return async (req, ctx) => {
    try {
      checkOrigin(req);
      refuseControlCharactersInQuery(req);
      const params = await ctx.params;
      refuseControlCharactersInParams(params);
      return await handler(req, { ...ctx, params: Promise.resolve(params) });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;
type Method = (typeof METHODS)[number];
type PlainHandler = (req: Request) => Promise<Response>;

/**
 * Handlers for the methods a route file does not implement, so that they answer 405 `method_not_allowed` in the
 * error envelope with an Allow header (Next.js alone answers a bare 405), and OPTIONS names the real methods.
 * Every route file ends with, for example: `export const { PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET", "POST");`
 */
export function refuseOtherMethods(...allowed: Method[]): Record<Method | "OPTIONS", PlainHandler> {
  const allow = [...allowed, ...(allowed.includes("GET") ? ["HEAD"] : []), "OPTIONS"].join(", ");
  const refuse: PlainHandler = async (req) =>
    json(
      new AppError("method_not_allowed", `${req.method} is not allowed here; use ${allowed.join(" or ")}.`).toBody(),
      { status: 405, headers: { allow } },
    );
  const handlers = Object.fromEntries(METHODS.map((m) => [m, refuse])) as Record<Method, PlainHandler>;
  return { ...handlers, OPTIONS: async () => new Response(null, { status: 204, headers: { allow } }) };
}

/**
 * For routes that read the request themselves (better-auth's `/api/auth/*`): refuses control characters in the
 * path (404), the query and a JSON or form body (422) in the error envelope, and hands back an equivalent request.
 */
export async function refuseControlCharactersIn(req: Request, limit = MAX_JSON_BYTES): Promise<Request> {
  refuseControlCharactersInParams(
    new URL(req.url).pathname.split("/").map((segment) => {
      try {
        return decodeURIComponent(segment);
      } catch {
        return segment;
      }
    }),
  );
  refuseControlCharactersInQuery(req);
  if (SAFE_METHODS.has(req.method) || !req.body) return req;
  const type = req.headers.get("content-type") ?? "";
  const bytes = await readBody(req, limit, `The body is larger than ${limit / 1024} KB.`);
  const text = bytes.toString("utf8");
  if (type.includes("application/json")) {
    let body: unknown;
    try {
      body = JSON.parse(text);
    } catch {
      // Not JSON: the handler answers that in its own words.
    }
    refuseControlCharacters(body);
  } else if (type.includes("application/x-www-form-urlencoded")) {
    const issues = parameterIssues(new URLSearchParams(text));
    if (issues.length > 0) throw new AppError("invalid", "Some fields hold control characters; see issues.", issues);
  }
  return new Request(req.url, {
    method: req.method,
    headers: req.headers,
    body: new Uint8Array(bytes),
    signal: req.signal,
  });
}
