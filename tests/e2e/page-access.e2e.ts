import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, inject, it } from "vitest";

// Every page under app/, fetched from the production build as a visitor, two members, a moderator and
// an admin: its HTML (with the streamed payload) and its RSC payload alone. What a caller may not see
// must be absent whatever the page's layout does; what they may see must be there.

const base = () => inject("baseUrl");
type Who = "visitor" | "memberA" | "memberB" | "moderator" | "admin";
const everyone: Who[] = ["visitor", "memberA", "memberB", "moderator", "admin"];
const accounts: Record<Exclude<Who, "visitor">, string> = {
  memberA: "member@example.org",
  memberB: "member2@example.org",
  moderator: "moderator@example.org",
  admin: "admin@example.org",
};
const cookies: Partial<Record<Who, string>> = {};

// Markers only this test writes, so finding one proves the data reached the page.
const SUBMITTED_NOTES = "submitted-notes-marker-4417";
const DRAFT_NOTES = "draft-notes-marker-9023";
const ROLE_CHANGED_NAME = "Ines Vardalou"; // keeper3@example.org, whose role the admin changes twice
const CONDITION_KEY = "page-access-condition";
let submittedId = "";
let draftId = "";

async function signIn(email: string): Promise<string> {
  const res = await fetch(`${base()}/api/auth/sign-in/email`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: base() },
    body: JSON.stringify({ email, password: inject("demoPassword") }),
  });
  expect(res.status, `sign-in of ${email}`).toBe(200);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0]!)
    .join("; ");
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- parsed JSON of whichever endpoint the test calls
async function api(who: Who, method: string, url: string, body?: unknown): Promise<any> {
  const res = await fetch(`${base()}${url}`, {
    method,
    headers: {
      origin: base(),
      ...(cookies[who] ? { cookie: cookies[who]! } : {}),
      ...(body ? { "content-type": "application/json" } : {}),
    },
    body: body ? JSON.stringify(body) : undefined,
  });
  const text = await res.text();
  expect(res.status, `${method} ${url} as ${who}: ${text.slice(0, 300)}`).toBeLessThan(300);
  return text ? JSON.parse(text) : null;
}

/**
 * The page's HTML (streamed payload included) and its RSC payload, as one text. Redirects are not followed,
 * except the framework's own hop that adds the `_rsc` parameter to an RSC request.
 */
async function page(who: Who, url: string): Promise<{ status: number; text: string; refused: boolean }> {
  const headers: Record<string, string> = cookies[who] ? { cookie: cookies[who]! } : {};
  const html = await fetch(`${base()}${url}`, { headers, redirect: "manual" });
  let rsc = await fetch(`${base()}${url}`, { headers: { ...headers, rsc: "1" }, redirect: "manual" });
  const hop = rsc.headers.get("location");
  if (rsc.status === 307 && hop?.includes("_rsc"))
    rsc = await fetch(new URL(hop, base()), { headers: { ...headers, rsc: "1" }, redirect: "manual" });
  const body = await html.text();
  const text = `${body}\n${await rsc.text()}`;
  expect(html.status, `${url} as ${who}`).toBeLessThan(500);
  // With a root loading.tsx the shell streams first, so a refusal can arrive inside a 200: the framework then
  // sends its redirect (to sign-in or /forbidden) or its 401/403/404 fallback in the stream.
  const refused = html.status !== 200 || /NEXT_REDIRECT|NEXT_HTTP_ERROR_FALLBACK;40[134]/.test(body);
  return { status: html.status, text, refused };
}

/** The mail catcher's files in the server's data directory: what each recipient's own inbox would hold. */
function caughtMail(): { id: string; raw: string }[] {
  const dir = path.join(inject("dataDir"), "mail");
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith(".eml"))
    .sort()
    .map((id) => ({
      id,
      raw: fs
        .readFileSync(path.join(dir, id), "utf8")
        .replace(/=\r?\n/g, "")
        .replace(/=3D/g, "="),
    }));
}

function resetTokensFor(email: string): string[] {
  return caughtMail()
    .filter(
      (m) =>
        new RegExp(`^To: .*${email.replace(/[.+]/g, "\\$&")}`, "mi").test(m.raw) &&
        /Subject: Choose a new Tanklore password/.test(m.raw),
    )
    .map((m) => m.raw.match(/\/api\/auth\/reset-password\/([A-Za-z0-9_-]+)/)![1]!);
}

beforeAll(async () => {
  for (const who of Object.keys(accounts) as (keyof typeof accounts)[]) cookies[who] = await signIn(accounts[who]);
  // Member A files one report for review and keeps one draft, each with notes only this test writes.
  const body = {
    speciesId: "paracheirodon-innesi",
    fishCount: 5,
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-10-01",
    water: { volume: 60, volumeUnit: "L", temperature: 25, temperatureUnit: "C", ph: 7, setting: "bare" },
    treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, stockBasis: "w/v", amountMl: 30, doses: 1 },
    outcome: {
      fishLost: 0,
      lossCause: null,
      distress: "none",
      condition: "cleared",
      observedDaysAfter: 7,
      notes: SUBMITTED_NOTES,
    },
    showName: false,
  };
  submittedId = (await api("memberA", "POST", "/api/reports", { ...body, submit: true })).id;
  draftId = (await api("memberA", "POST", "/api/reports/drafts", { fishCount: 2, outcome: { notes: DRAFT_NOTES } })).id;
  // Two entries in the role-change log and one in the catalogue-change log.
  const keeper = (await api("admin", "GET", "/api/admin/members?q=keeper3%40example.org")).members[0];
  await api("admin", "PATCH", `/api/admin/members/${keeper.id}`, { role: "moderator" });
  await api("admin", "PATCH", `/api/admin/members/${keeper.id}`, { role: "member" });
  await api("admin", "POST", "/api/admin/catalogue/conditions", { slug: CONDITION_KEY, name: "Page access condition" });
  // A reset mail for the admin in the outbox, asked by a visitor (the takeover path's first step).
  await api("visitor", "POST", "/api/auth/request-password-reset", {
    email: "admin@example.org",
    redirectTo: "/reset-password",
  });
  for (let i = 0; i < 50 && resetTokensFor("admin@example.org").length === 0; i++)
    await new Promise((r) => setTimeout(r, 100));
}, 120_000);

/** What each page shows, and to whom. `secret` must be absent for everyone not in `allowed`, and present for those in it. */
interface PageCase {
  route: string;
  url: () => string;
  allowed: Who[];
  secrets: () => string[];
}

const cases: PageCase[] = [
  { route: "/", url: () => "/", allowed: everyone, secrets: () => [] },
  { route: "/cautions", url: () => "/cautions", allowed: everyone, secrets: () => [] },
  { route: "/evidence", url: () => "/evidence", allowed: everyone, secrets: () => [] },
  {
    route: "/evidence/[group]",
    url: () => "/evidence/tetras?agent=hydrogen-peroxide",
    allowed: everyone,
    secrets: () => [],
  },
  { route: "/forbidden", url: () => "/forbidden", allowed: everyone, secrets: () => [] },
  { route: "/forgot-password", url: () => "/forgot-password", allowed: everyone, secrets: () => [] },
  { route: "/planner", url: () => "/planner", allowed: everyone, secrets: () => [] },
  { route: "/reset-password", url: () => "/reset-password", allowed: everyone, secrets: () => [] },
  { route: "/sign-in", url: () => "/sign-in", allowed: everyone, secrets: () => [] },
  { route: "/sign-up", url: () => "/sign-up", allowed: everyone, secrets: () => [] },
  {
    route: "/reports",
    url: () => "/reports",
    allowed: ["memberA", "memberB", "moderator", "admin"],
    secrets: () => ["Every treatment you have reported"],
  },
  {
    route: "/reports/new",
    url: () => "/reports/new",
    allowed: ["memberA", "memberB", "moderator", "admin"],
    secrets: () => ["paracheirodon-innesi"],
  },
  {
    route: "/reports/[id]",
    url: () => `/reports/${submittedId}`,
    allowed: ["memberA", "moderator", "admin"],
    secrets: () => [SUBMITTED_NOTES],
  },
  {
    route: "/reports/[id] (draft)",
    url: () => `/reports/${draftId}`,
    allowed: ["memberA"],
    secrets: () => [DRAFT_NOTES],
  },
  {
    route: "/reports/[id]/edit",
    url: () => `/reports/${draftId}/edit`,
    allowed: ["memberA"],
    secrets: () => [DRAFT_NOTES],
  },
  {
    route: "/review",
    url: () => "/review",
    allowed: ["moderator", "admin"],
    secrets: () => ["waiting. Reports count only once"],
  },
  {
    route: "/review/reports",
    url: () => "/review/reports",
    allowed: ["moderator", "admin"],
    secrets: () => ["submitted reports in the club"],
  },
  {
    route: "/review/[id]",
    url: () => `/review/${submittedId}`,
    allowed: ["moderator", "admin"],
    secrets: () => [SUBMITTED_NOTES],
  },
  {
    route: "/admin/catalogue",
    url: () => "/admin/catalogue",
    allowed: ["admin"],
    secrets: () => ["Recent changes", CONDITION_KEY],
  },
  {
    route: "/admin/exchange",
    url: () => "/admin/exchange",
    allowed: ["admin"],
    secrets: () => ["Import historical reports"],
  },
  {
    route: "/admin/members",
    url: () => "/admin/members",
    allowed: ["admin"],
    secrets: () => [ROLE_CHANGED_NAME, "Recent role changes"],
  },
  {
    route: "/admin/settings",
    url: () => "/admin/settings",
    allowed: ["admin"],
    secrets: () => ["Confidence level of intervals"],
  },
  {
    route: "/admin/jobs",
    url: () => "/admin/jobs",
    allowed: ["admin"],
    secrets: () => ["All work by kind", "claimed in the database by whichever server process is free"],
  },
  {
    route: "/admin/mail",
    url: () => "/admin/mail",
    allowed: ["admin"],
    secrets: () => ["Choose a new Tanklore password", "admin@example.org"],
  },
  {
    route: "/admin/mail/[id]",
    url: () =>
      // The admin's own reset message (other browser tests leave reset messages to other members in the outbox).
      `/admin/mail/${encodeURIComponent(caughtMail().find((m) => /Subject: Choose a new Tanklore password/.test(m.raw) && /^To:.*admin@example\.org/im.test(m.raw))!.id)}`,
    allowed: ["admin"],
    secrets: () => ["Choose a new Tanklore password", "admin@example.org", "/api/auth/reset-password/•••"],
  },
];

/** The app's pages, as routes without their groups, from the files under app/. */
function appPages(dir = path.join(process.cwd(), "app"), prefix = ""): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    if (entry.isFile() && entry.name === "page.tsx") out.push(prefix || "/");
    if (entry.isDirectory() && entry.name !== "api" && !entry.name.startsWith("_")) {
      const seg = /^\(.*\)$/.test(entry.name) ? "" : `/${entry.name}`;
      out.push(...appPages(path.join(dir, entry.name), prefix + seg));
    }
  }
  return out;
}

/** Every demo account's address but the caller's own. */
const othersEmails = (who: Who) =>
  [
    "admin@example.org",
    "moderator@example.org",
    "member@example.org",
    "member2@example.org",
    "keeper3@example.org",
  ].filter((e) => e !== (who === "visitor" ? "" : accounts[who]));

describe("every page, as every kind of caller", () => {
  it("covers every page under app/", () => {
    const covered = new Set(cases.map((c) => c.route.replace(/ \(.*\)$/, "")));
    expect(appPages().filter((p) => !covered.has(p))).toEqual([]);
  });

  for (const c of cases) {
    it(`${c.route}: shows its data to ${c.allowed.join(", ")} and to nobody else`, async () => {
      for (const who of everyone) {
        const { status, text, refused } = await page(who, c.url());
        const may = c.allowed.includes(who);
        if (may) {
          expect(status, `${c.route} as ${who}`).toBe(200);
          expect(refused, `${c.route} as ${who} was refused`).toBe(false);
          for (const s of c.secrets()) expect(text, `${c.route} as ${who} should show "${s}"`).toContain(s);
        } else {
          expect(refused, `${c.route} as ${who} was not refused`).toBe(true);
          for (const s of c.secrets()) expect(text, `${c.route} as ${who} must not show "${s}"`).not.toContain(s);
        }
        // No page shows anyone another member's address, except the outbox to an admin.
        if (!(who === "admin" && c.route.startsWith("/admin/mail"))) {
          for (const e of othersEmails(who)) expect(text, `${c.route} as ${who} shows ${e}`).not.toContain(e);
        }
        // No page ever holds a live reset token.
        for (const t of resetTokensFor("admin@example.org"))
          expect(text, `${c.route} as ${who} holds a reset token`).not.toContain(t);
        // The role-change and catalogue-change logs name the admin who made the change.
        if (who !== "admin" && c.route.startsWith("/admin")) expect(text).not.toContain("Orla Quillfeather");
      }
    });
  }
});

describe("taking over the admin account through the outbox", () => {
  it("fails: after a visitor asks a reset for the admin, the outbox and every message page hold no token, subject or address", async () => {
    const ask = await fetch(`${base()}/api/auth/request-password-reset`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: base() },
      body: JSON.stringify({ email: "admin@example.org", redirectTo: "/reset-password" }),
    });
    expect(ask.status).toBe(200);
    // The mail catcher stores the message as it arrives; wait until it is there.
    for (let i = 0; i < 50 && resetTokensFor("admin@example.org").length === 0; i++)
      await new Promise((r) => setTimeout(r, 100));
    const tokens = resetTokensFor("admin@example.org");
    expect(tokens.length).toBeGreaterThan(0);

    const messages = caughtMail();
    for (const who of ["visitor", "memberA", "moderator"] as Who[]) {
      for (const url of ["/admin/mail", ...messages.map((m) => `/admin/mail/${encodeURIComponent(m.id)}`)]) {
        const { text, refused } = await page(who, url);
        expect(refused, `${url} as ${who}`).toBe(true);
        for (const t of tokens) expect(text).not.toContain(t);
        expect(text).not.toContain("Choose a new Tanklore password");
        expect(text).not.toContain("admin@example.org");
      }
    }
    // An admin sees the message, addressed and dated, with its link masked: no token to use.
    for (const m of messages) {
      const { status, text, refused } = await page("admin", `/admin/mail/${encodeURIComponent(m.id)}`);
      expect(status).toBe(200);
      expect(refused).toBe(false);
      for (const t of tokens) expect(text).not.toContain(t);
    }
    const outbox = await page("admin", "/admin/mail");
    expect(outbox.text).toContain("Choose a new Tanklore password");
    for (const t of tokens) expect(outbox.text).not.toContain(t);
  });
});
