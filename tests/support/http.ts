// Calls route handlers directly, as Next.js would, with a cookie jar per test actor.
export const BASE = "http://localhost:3000";

// Every route handler fits, whatever its own params type: a narrower type would refuse most of them.
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- params of each route differ
type Handler = (req: Request, ctx: { params: Promise<any> }) => Promise<Response>;

export interface CallOptions {
  method?: string;
  body?: unknown;
  cookie?: string;
  headers?: Record<string, string>;
  params?: Record<string, string | string[]>;
}

// The body is parsed JSON of every response shape in api.md, read by the assertions of each test.
export async function call(
  handler: Handler,
  path: string,
  opts: CallOptions = {},
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- parsed JSON of any endpoint
): Promise<{ status: number; body: any; res: Response }> {
  const headers: Record<string, string> = { ...opts.headers };
  if (opts.cookie) headers.cookie = opts.cookie;
  // As a browser would: a state-changing request from our own pages names our origin (route() checks it).
  if (
    opts.cookie &&
    !["GET", "HEAD"].includes(opts.method ?? (opts.body !== undefined ? "POST" : "GET")) &&
    !("origin" in headers)
  )
    headers.origin = BASE;
  let body: BodyInit | undefined;
  if (opts.body !== undefined) {
    headers["content-type"] ??= "application/json";
    body = typeof opts.body === "string" ? opts.body : JSON.stringify(opts.body);
  }
  const req = new Request(`${BASE}${path}`, { method: opts.method ?? (body ? "POST" : "GET"), headers, body });
  const res = await handler(req, { params: Promise.resolve(opts.params ?? {}) });
  const text = await res.text();
  let parsed: unknown = text;
  try {
    parsed = text ? JSON.parse(text) : null;
  } catch {
    // Not JSON; keep the text.
  }
  return { status: res.status, body: parsed, res };
}

/** The session cookie(s) from a better-auth response, as a Cookie header value. */
export function cookieFrom(res: Response): string {
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .filter((c) => !c!.endsWith("="))
    .join("; ");
}
