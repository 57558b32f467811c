import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import sharp from "sharp";
import * as authRoute from "@/app/api/auth/[...all]/route";
import * as catchAllRoute from "@/app/api/[...path]/route";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as reportsRoute from "@/app/api/reports/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as photosRoute from "@/app/api/reports/[id]/photos/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { BASE, call, type CallOptions } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

// The API's surface as an outsider meets it: every route handler under app/api fed control characters in each
// JSON field, query parameter and path part (422 naming the field, or 404 for a path; never a 5xx), unknown
// nested fields, wrong methods and unknown paths (the error envelope), the origin rule for cookie-bearing
// writes, and parallel photo uploads against the per-report limit.

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- every route handler fits, whatever its params type
type Handler = (req: Request, ctx: { params: Promise<any> }) => Promise<Response>;
type Module = Record<string, unknown>;
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;

const apiDir = path.resolve("app/api");
const routeFiles = (fs.readdirSync(apiDir, { recursive: true }) as string[])
  .filter((f) => f.endsWith("route.ts"))
  .map((f) => ({ file: path.join(apiDir, f), template: `/api/${path.dirname(f).split(path.sep).join("/")}` }))
  .sort((a, b) => a.template.localeCompare(b.template));

const isAuth = (t: string) => t.startsWith("/api/auth/");
const isCatchAll = (t: string) => t === "/api/[...path]";

type U = Awaited<ReturnType<typeof signedInUser>>;
let admin: U, member: U;
let draftId: string;
const modules = new Map<string, Module>();
const seen: { what: string; status: number }[] = [];

/** Calls a handler and notes the status, for the suite-wide "no 5xx" check. */
async function hit(handler: Handler, url: string, opts: CallOptions, what: string) {
  const r = await call(handler, url, opts);
  seen.push({ what, status: r.status });
  return r;
}

/** A route template with its dynamic parts filled: real rows where the handler needs them to reach its body. */
function fill(template: string, override?: string): { url: string; params: Record<string, string> } {
  const params: Record<string, string> = {};
  const url = template.replace(/\[([^\]]+)\]/g, (_, name: string) => {
    const value =
      override ??
      (template.startsWith("/api/reports/")
        ? draftId
        : template.startsWith("/api/photos/")
          ? "00000000-0000-4000-8000-000000000000"
          : template.startsWith("/api/admin/members/")
            ? member.id
            : name === "kind"
              ? "groups"
              : template.includes("/species/")
                ? "paracheirodon-innesi"
                : name === "key"
                  ? "livebearers"
                  : name === "groupSlug"
                    ? "tetras"
                    : "x");
    params[name] = value;
    return encodeURIComponent(value);
  });
  return { url, params };
}

/** A valid body for every route that reads JSON, by "METHOD template". */
const bodies: Record<string, () => Record<string, unknown>> = {
  "POST /api/reports": () => reportBody({ speciesOther: "Unlisted tetra" }),
  "POST /api/reports/drafts": () => reportBody({ courseOpen: false }),
  "PATCH /api/reports/[id]": () => reportBody(),
  "POST /api/reports/[id]/entries": () => ({
    kind: "observation",
    at: new Date().toISOString(),
    text: "The fish looked calm.",
  }),
  "PATCH /api/reports/[id]/entries/[entryId]": () => ({ text: "Corrected: the fish looked calm.", note: "A typo." }),
  "POST /api/reports/[id]/decision": () => ({ decision: "return", note: "Please add the pH." }),
  "POST /api/reports/[id]/corrections": () => ({ kind: "lossCause", lossCause: "disease", note: "Seen this before." }),
  "POST /api/admin/catalogue/[kind]": () => ({
    slug: "fuzz-group",
    name: "Fuzz group",
    description: "Made by the fuzz test.",
    sortOrder: 3,
    hidden: false,
  }),
  "PATCH /api/admin/catalogue/[kind]/[key]": () => ({ name: "Livebearers", description: "Changed by the fuzz test." }),
  "POST /api/admin/catalogue/species/[key]/merge": () => ({ into: "danio-rerio", note: "The same fish." }),
  "PATCH /api/admin/members/[id]": () => ({ role: "moderator" }),
  "PATCH /api/admin/settings": () => ({ name: "Fuzz test club" }),
  "POST /api/admin/jobs": () => ({ run: "moderator-digest" }),
};

/** Query parameters each GET route reads (besides these, an unknown one is tried on every route). */
const queryNames: Record<string, string[]> = {
  "/api/dose": [
    "agent",
    "stockPercent",
    "stockFormId",
    "basis",
    "volume",
    "volumeUnit",
    "length",
    "lengthUnit",
    "target",
    "addedMl",
    "fraction",
    "speciesId",
    "group",
  ],
  "/api/summaries": ["agent", "condition"],
  "/api/summaries/[groupSlug]": ["agent", "condition"],
  "/api/export/summaries.csv": ["agent", "condition"],
  "/api/admin/members": ["q", "role", "sort", "dir", "page", "pageSize"],
  "/api/reports": ["scope", "status", "sort", "dir", "page", "pageSize"],
  "/api/review/queue": ["order"],
  "/api/photos/[id]": ["size"],
};

/** Every leaf of a JSON value with its path. */
function leaves(v: unknown, at: string[] = []): { path: string[]; value: unknown }[] {
  if (v !== null && typeof v === "object") return Object.entries(v).flatMap(([k, x]) => leaves(x, [...at, k]));
  return [{ path: at, value: v }];
}

function withLeaf(body: Record<string, unknown>, at: string[], value: unknown): Record<string, unknown> {
  const copy = structuredClone(body);
  let o: Record<string, unknown> = copy;
  for (const k of at.slice(0, -1)) o = o[k] as Record<string, unknown>;
  o[at.at(-1)!] = value;
  return copy;
}

// C0 controls other than tab, LF and CR, and DEL; the suite rotates through them.
const CONTROLS = ["\u0000", "\u0001", "\u0007", "\u0008", "\u000b", "\u000c", "\u001b", "\u001f", "\u007f"];
let turn = 0;
const nextControl = () => CONTROLS[turn++ % CONTROLS.length]!;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  admin = await signedInUser("admin");
  member = await signedInUser("member");
  for (const r of routeFiles) modules.set(r.template, (await import(r.file)) as Module);
  const d = await call(draftsRoute.POST, "/api/reports/drafts", { body: { fishCount: 3 }, cookie: admin.cookie });
  draftId = d.body.id;
});

describe("control characters in JSON bodies", () => {
  it("covers every route that reads a JSON body", () => {
    const reading = routeFiles.flatMap(({ file, template }) =>
      fs
        .readFileSync(file, "utf8")
        .split(/^export const /m)
        // Exported handlers only (the auth route's set-role handler is covered with the auth routes below).
        .filter((block) => /^(GET|POST|PUT|PATCH|DELETE)\b/.test(block) && block.includes("parseJson("))
        .map((block) => `${block.slice(0, block.indexOf(" "))} ${template}`),
    );
    expect(reading.length).toBeGreaterThanOrEqual(10);
    expect(reading.filter((k) => !bodies[k])).toEqual([]);
  });

  it("answers 422 naming the field for a control character in any field of any body, and never a 5xx", async () => {
    for (const [key, make] of Object.entries(bodies)) {
      const [method, template] = key.split(" ") as [string, string];
      const handler = modules.get(template)![method] as Handler;
      const { url, params } = fill(template);
      for (const leaf of leaves(make())) {
        const field = leaf.path.join(".");
        // Inside the text where the field is text, and as the whole value where it is a number, boolean or null.
        const value = typeof leaf.value === "string" ? `${leaf.value}${nextControl()}end` : nextControl();
        const r = await hit(
          handler,
          url,
          { method, body: withLeaf(make(), leaf.path, value), cookie: admin.cookie, params },
          `${key} ${field}`,
        );
        expect(r.status, `${key} ${field}`).toBe(422);
        expect(r.body.error.code).toBe("invalid");
        expect(r.body.error.issues, `${key} ${field}`).toContainEqual({
          path: field,
          message: expect.stringMatching(/control character U\+00[0-7][0-9A-F]/),
        });
      }
      // In a field's name, at the top and one level down.
      const named = await hit(
        handler,
        url,
        { method, body: { ...make(), "bad\u0000name": 1 }, cookie: admin.cookie, params },
        `${key} key`,
      );
      expect(named.status).toBe(422);
      expect(named.body.error.issues).toContainEqual({
        path: "bad\\u0000name",
        message: expect.stringMatching(/field's name/),
      });
    }
  });

  it("stores nothing for a refused body, and accepts tabs and line breaks (CR included) in free text", async () => {
    const db = await getDb();
    const before = (await db.select({ n: count() }).from(schema.reports))[0]!.n;
    const refused = await hit(
      reportsRoute.POST,
      "/api/reports",
      { body: reportBody({ outcome: { notes: "fine\u0000" } }), cookie: member.cookie },
      "refused",
    );
    expect(refused.status).toBe(422);
    expect((await db.select({ n: count() }).from(schema.reports))[0]!.n).toBe(before);

    const ok = await hit(
      reportsRoute.POST,
      "/api/reports",
      { body: reportBody({ outcome: { notes: "Day one:\tcloudy.\r\nDay two:\tclear." } }), cookie: member.cookie },
      "ok",
    );
    expect(ok.status).toBe(201);
    const got = await call(reportRoute.GET, `/api/reports/${ok.body.id}`, {
      cookie: member.cookie,
      params: { id: ok.body.id },
    });
    expect(JSON.stringify(got.body)).toContain("Day one:\\tcloudy.\\r\\nDay two:\\tclear.");
  });

  it("answers 400, not 500, for a raw NUL byte (not valid JSON) and for a deeply nested body", async () => {
    const raw = await hit(
      reportsRoute.POST,
      "/api/reports",
      { body: '{"speciesId":"a\u0000b"}', cookie: member.cookie },
      "raw NUL",
    );
    expect(raw.status).toBe(400);
    const deep = await hit(
      reportsRoute.POST,
      "/api/reports",
      { body: `${"[".repeat(100_000)}"\\u0000"${"]".repeat(100_000)}`, cookie: member.cookie },
      "deep",
    );
    expect(deep.status).toBe(422);
  });
});

describe("control characters in queries and paths", () => {
  it("answers 422 naming the parameter on every route that answers GET, for known and unknown parameters", async () => {
    const getRoutes = routeFiles.filter((r) => !isAuth(r.template) && !isCatchAll(r.template));
    expect(getRoutes.length).toBeGreaterThanOrEqual(20);
    for (const { template } of getRoutes) {
      const handler = modules.get(template)!.GET as Handler;
      const { url, params } = fill(template);
      for (const name of [...(queryNames[template] ?? []), "unknownParam"]) {
        const control = nextControl();
        const r = await hit(
          handler,
          `${url}?${name}=a${encodeURIComponent(control)}b`,
          { cookie: admin.cookie, params },
          `GET ${template}?${name}`,
        );
        // Routes without GET answer 405 whatever the query.
        if (r.status === 405) continue;
        expect(r.status, `${template}?${name}`).toBe(422);
        expect(r.body.error.issues).toContainEqual({ path: name, message: expect.stringMatching(/control character/) });
      }
    }
  });

  it("answers 404, never a 5xx, for a control character in any path part of any route, whatever the method", async () => {
    for (const { template } of routeFiles.filter((r) => r.template.includes("[") && !isAuth(r.template))) {
      for (const method of METHODS) {
        const handler = modules.get(template)![method] as Handler;
        const { url, params } = fill(template, "x\u0000y");
        const r = await hit(
          handler,
          url,
          { method, cookie: admin.cookie, params, ...(method === "GET" || method === "DELETE" ? {} : { body: {} }) },
          `${method} ${template} path`,
        );
        expect([404, 405], `${method} ${template}`).toContain(r.status);
        expect(r.body.error.code).toMatch(/not_found|method_not_allowed/);
      }
    }
  });
});

describe("better-auth's routes, which read the request themselves", () => {
  const auth = (url: string, opts: CallOptions = {}) =>
    hit(authRoute.POST, url, { ...opts, method: "POST" }, `POST ${url}`);

  it("answers 422 naming the field for a control character in each field of sign-up, and stores no account", async () => {
    const base = { name: "Fen Fuzzer", email: "fen.fuzzer@example.org", password: "a-long-password-1" };
    for (const field of Object.keys(base) as (keyof typeof base)[]) {
      const r = await auth("/api/auth/sign-up/email", { body: { ...base, [field]: `${base[field]}\u0000` } });
      expect(r.status, field).toBe(422);
      expect(r.body.error.issues).toContainEqual({ path: field, message: expect.stringMatching(/U\+0000/) });
    }
    const db = await getDb();
    expect(await db.select().from(schema.users).where(eq(schema.users.email, base.email))).toEqual([]);
  });

  it("refuses control characters in sign-in, reset, profile and form bodies, in queries and in path parts", async () => {
    const cases: [string, CallOptions][] = [
      ["/api/auth/sign-in/email", { body: { email: "x\u0000@example.org", password: "a-long-password-1" } }],
      [
        "/api/auth/request-password-reset",
        { body: { email: "someone@example.org", redirectTo: "/reset-password\u0001" } },
      ],
      ["/api/auth/reset-password", { body: { newPassword: "a-long-password-2", token: "\u0000" } }],
      ["/api/auth/update-user", { body: { name: "New\u001bname" }, cookie: member.cookie }],
      [
        "/api/auth/sign-in/email",
        {
          body: `email=a%00b%40example.org&password=x`,
          headers: { "content-type": "application/x-www-form-urlencoded" },
        },
      ],
    ];
    for (const [url, opts] of cases) {
      const r = await auth(url, opts);
      expect(r.status, url).toBe(422);
      expect(r.body.error.code).toBe("invalid");
    }
    const q = await hit(authRoute.GET, "/api/auth/verify-email?token=%00", {}, "verify-email query");
    expect(q.status).toBe(422);
    expect(q.body.error.issues).toContainEqual({ path: "token", message: expect.stringMatching(/U\+0000/) });
    const p = await hit(authRoute.GET, "/api/auth/reset-password/%00?callbackURL=%2Freset-password", {}, "reset path");
    expect(p.status).toBe(404);
  });

  it("still signs up and in with ordinary bodies after the check", async () => {
    const r = await auth("/api/auth/sign-up/email", {
      body: { name: "Olwen Ordinary", email: "olwen.ordinary@example.org", password: "a-long-password-1" },
    });
    expect(r.status).toBe(200);
    const s = await auth("/api/auth/sign-in/email", {
      body: { email: member.email, password: "correct-horse-battery" },
    });
    expect(s.status).toBe(200);
  });
});

describe("unknown fields inside nested objects", () => {
  it("are refused like top-level ones, with the field's own path, and nothing is stored or changed", async () => {
    const db = await getDb();
    const before = (await db.select({ n: count() }).from(schema.reports))[0]!.n;
    for (const [nested, field] of [
      ["water", "salinity"],
      ["treatment", "brand"],
      ["outcome", "mood"],
    ] as const) {
      const r = await hit(
        reportsRoute.POST,
        "/api/reports",
        { body: reportBody({ [nested]: { [field]: 1 } }), cookie: member.cookie },
        "nested",
      );
      expect(r.status).toBe(422);
      expect(r.body.error.issues).toContainEqual({
        path: `${nested}.${field}`,
        message: `There is no field "${field}" here; remove it.`,
      });
      const d = await hit(
        draftsRoute.POST,
        "/api/reports/drafts",
        { body: { [nested]: { [field]: 1 } }, cookie: member.cookie },
        "nested draft",
      );
      expect(d.status).toBe(422);
      expect(d.body.error.issues).toContainEqual(expect.objectContaining({ path: `${nested}.${field}` }));
    }
    const top = await hit(
      reportsRoute.POST,
      "/api/reports",
      { body: reportBody({ colour: "blue" }), cookie: member.cookie },
      "top",
    );
    expect(top.body.error.issues).toContainEqual({
      path: "colour",
      message: 'There is no field "colour" here; remove it.',
    });
    expect((await db.select({ n: count() }).from(schema.reports))[0]!.n).toBe(before);

    const patch = await hit(
      reportRoute.PATCH,
      `/api/reports/${draftId}`,
      { method: "PATCH", body: { water: { volume: 80, extra: true } }, cookie: admin.cookie, params: { id: draftId } },
      "nested patch",
    );
    expect(patch.status).toBe(422);
    const [row] = await db
      .select({ volumeL: schema.reports.volumeL })
      .from(schema.reports)
      .where(eq(schema.reports.id, draftId));
    expect(row?.volumeL).toBeNull();
  });
});

describe("wrong methods and unknown API paths", () => {
  it("every route file answers every method: the missing ones 405 in the envelope with an Allow header", async () => {
    for (const { template } of routeFiles.filter((r) => !isCatchAll(r.template))) {
      const mod = modules.get(template)!;
      for (const m of [...METHODS, "OPTIONS"]) expect(typeof mod[m], `${template} exports ${m}`).toBe("function");
      const { url, params } = fill(template);
      const options = await hit(mod.OPTIONS as Handler, url, { method: "OPTIONS", params }, `OPTIONS ${template}`);
      expect(options.status).toBe(204);
      const allow = options.res.headers.get("allow")!.split(", ");
      expect(allow).toContain("OPTIONS");
      for (const m of METHODS.filter((m) => !allow.includes(m))) {
        const r = await hit(mod[m] as Handler, url, { method: m, params }, `${m} ${template}`);
        expect(r.status, `${m} ${template}`).toBe(405);
        expect(r.body).toEqual({
          error: { code: "method_not_allowed", message: expect.stringContaining(`${m} is not allowed here`) },
        });
        expect(r.res.headers.get("allow")).toBe(allow.join(", "));
      }
    }
    const members = await hit(
      modules.get("/api/admin/members")!.DELETE as Handler,
      "/api/admin/members",
      { method: "DELETE" },
      "DELETE members",
    );
    expect(members.res.headers.get("allow")).toBe("GET, HEAD, OPTIONS");
  });

  it("answers 404 in the envelope for an address no route serves, whatever the method", async () => {
    for (const m of [...METHODS, "OPTIONS"]) {
      const r = await hit(
        catchAllRoute[m as keyof typeof catchAllRoute] as Handler,
        "/api/no/such/thing",
        { method: m, params: { path: ["no", "such", "thing"] } },
        `${m} unknown`,
      );
      expect(r.status).toBe(404);
      expect(r.body).toEqual({ error: { code: "not_found", message: expect.stringContaining("/api/no/such/thing") } });
    }
  });
});

describe("the origin rule for state-changing requests", () => {
  const draft = (headers: Record<string, string>, cookie?: string) => {
    const h: Record<string, string> = { "content-type": "application/json", ...headers };
    if (cookie) h.cookie = cookie;
    return draftsRoute.POST(
      new Request(`${BASE}/api/reports/drafts`, { method: "POST", headers: h, body: JSON.stringify({ fishCount: 2 }) }),
      { params: Promise.resolve({}) },
    );
  };
  const drafts = async () =>
    (
      await (await getDb()).select({ n: count() }).from(schema.reports).where(eq(schema.reports.authorId, member.id))
    )[0]!.n;

  it("refuses a session-cookie write with no Origin, a null Origin or another site's, with 403 in the envelope and nothing stored", async () => {
    const before = await drafts();
    for (const headers of <Record<string, string>[]>[
      {},
      { origin: "null" },
      { origin: "https://elsewhere.example.org" },
      { origin: "http://localhost:3001" },
      { "sec-fetch-site": "cross-site" },
      { referer: `${BASE}/reports` },
    ]) {
      const r = await draft(headers, member.cookie);
      expect(r.status, JSON.stringify(headers)).toBe(403);
      expect((await r.json()).error.code).toBe("forbidden");
    }
    expect(await drafts()).toBe(before);
  });

  it("accepts our own Origin, Sec-Fetch-Site same-origin, a proxy's forwarded host and the configured public address", async () => {
    for (const headers of <Record<string, string>[]>[
      { origin: BASE },
      { "sec-fetch-site": "same-origin" },
      { origin: "https://club.example.org", "x-forwarded-host": "club.example.org" },
      // BETTER_AUTH_URL in the tests is http://localhost:3000; the request arrives for another host name.
      { origin: "http://localhost:3000", host: "127.0.0.1:3000" },
    ]) {
      const r = await draft(headers, member.cookie);
      expect(r.status, JSON.stringify(headers)).toBe(201);
    }
  });

  it("leaves cookie-less clients alone (they reach the sign-in check), and reads never need an Origin", async () => {
    expect((await draft({})).status).toBe(401);
    expect((await draft({}, "theme=dark")).status).toBe(401);
    const read = await call(reportsRoute.GET, "/api/reports", {
      cookie: member.cookie,
      headers: { origin: "https://elsewhere.example.org" },
    });
    expect(read.status).toBe(200);
    // A script signs in without a cookie or an Origin.
    const signIn = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email: member.email, password: "correct-horse-battery" },
    });
    expect(signIn.status).toBe(200);
  });
});

describe("the photo limit under parallel uploads", () => {
  it("ends 20 parallel uploads to one draft with exactly 12 photos stored and the rest refused with 409", async () => {
    const owner = await signedInUser("member");
    const created = await call(reportsRoute.POST, "/api/reports", { body: reportBody(), cookie: owner.cookie });
    const id = created.body.id as string;
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 20, g: 90, b: 120 } } })
      .jpeg()
      .toBuffer();
    const upload = () => {
      const form = new FormData();
      form.set("file", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "tank.jpg");
      form.set("stage", "during");
      return photosRoute.POST(
        new Request(`${BASE}/api/reports/${id}/photos`, {
          method: "POST",
          body: form,
          headers: { cookie: owner.cookie, origin: BASE },
        }),
        { params: Promise.resolve({ id }) },
      );
    };
    const answers = await Promise.all(Array.from({ length: 20 }, upload));
    const statuses = answers.map((r) => r.status).sort();
    expect(statuses.filter((s) => s === 201)).toHaveLength(12);
    expect(statuses.filter((s) => s === 409)).toHaveLength(8);
    for (const r of answers.filter((a) => a.status === 409)) {
      expect(await r.json()).toEqual({
        error: { code: "conflict", message: "A report holds at most 12 photos; remove one first." },
      });
    }
    const db = await getDb();
    expect((await db.select({ n: count() }).from(schema.photos).where(eq(schema.photos.reportId, id)))[0]!.n).toBe(12);
    // The refused uploads left no files behind: a full and a thumbnail rendition per stored photo.
    expect(
      fs.readdirSync(path.join(process.env.DATA_DIR!, "uploads", id)).filter((f) => f.endsWith(".jpg")),
    ).toHaveLength(24);
    const events = await db.select().from(schema.reportEvents).where(eq(schema.reportEvents.reportId, id));
    expect(events.filter((e) => e.action === "photo_added")).toHaveLength(12);
  });

  it("answers 422 naming the field for a control character in the upload's stage field", async () => {
    const form = new FormData();
    form.set(
      "file",
      new Blob(
        [
          new Uint8Array(
            await sharp({ create: { width: 8, height: 8, channels: 3, background: "#000" } })
              .jpeg()
              .toBuffer(),
          ),
        ],
        { type: "image/jpeg" },
      ),
      "a.jpg",
    );
    form.set("stage", "during\u0000");
    const r = await photosRoute.POST(
      new Request(`${BASE}/api/reports/${draftId}/photos`, {
        method: "POST",
        body: form,
        headers: { cookie: admin.cookie, origin: BASE },
      }),
      { params: Promise.resolve({ id: draftId }) },
    );
    expect(r.status).toBe(422);
    expect((await r.json()).error.issues).toContainEqual(expect.objectContaining({ path: "stage" }));
  });
});

describe("across the whole suite", () => {
  it("never answered a 5xx", () => {
    expect(seen.length).toBeGreaterThan(300);
    expect(seen.filter((s) => s.status >= 500)).toEqual([]);
  });
});
