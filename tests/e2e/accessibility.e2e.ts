import { createRequire } from "node:module";
import type { BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { baseUrl, useBrowser } from "./browser";

// Every page, signed out and in each role, at a desktop and a phone width: axe-core (WCAG 2.0/2.1 A and AA) finds
// nothing, nothing scrolls sideways at 390 px, and no internal value (an enum, a field path, an ISO time) reaches
// the reader. One browser, one context per role, one page per context reused for every visit.

const axeSource: string = createRequire(import.meta.url)("axe-core").source;
const WCAG_TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];
const WIDTHS = [1280, 390] as const;

const browser = useBrowser();
type Role = "visitor" | "member" | "moderator" | "admin";
const accounts: Record<Exclude<Role, "visitor">, string> = {
  member: "member@example.org",
  moderator: "moderator@example.org",
  admin: "admin@example.org",
};
const contexts: Partial<Record<Role, BrowserContext>> = {};
const pages: Partial<Record<Role, Page>> = {};

// Made in beforeAll through the API, as the member: a submitted report, a complete draft and an open course log.
let submittedId = "";
let draftId = "";
let courseId = "";

async function signedInContext(role: Role): Promise<Page> {
  const context = await browser().newContext({ viewport: { width: 1280, height: 900 } });
  contexts[role] = context;
  const page = await context.newPage();
  if (role !== "visitor") {
    const res = await page.request.post(`${baseUrl()}/api/auth/sign-in/email`, {
      headers: { origin: baseUrl() },
      data: { email: accounts[role], password: inject("demoPassword") },
    });
    expect(res.status(), `sign-in as ${role}`).toBe(200);
  }
  pages[role] = page;
  return page;
}

async function post(page: Page, url: string, body: unknown): Promise<{ id: string }> {
  const res = await page.request.post(`${baseUrl()}${url}`, { headers: { origin: baseUrl() }, data: body });
  const text = await res.text();
  expect(res.status(), `${url}: ${text.slice(0, 300)}`).toBeLessThan(300);
  return JSON.parse(text);
}

beforeAll(async () => {
  for (const role of ["visitor", "member", "moderator", "admin"] as const) await signedInContext(role);
  const member = pages.member!;
  const report = {
    speciesId: "paracheirodon-innesi",
    fishCount: 6,
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-10-01",
    water: { volume: 60, volumeUnit: "L", temperature: 25, temperatureUnit: "C", ph: 7, setting: "bare" },
    treatment: {
      agentSlug: "hydrogen-peroxide",
      stockPercent: 3,
      stockBasis: "w/v",
      amountMl: 30,
      doses: 2,
      intervalHours: 48,
    },
    outcome: {
      fishLost: 0,
      lossCause: null,
      distress: "mild",
      condition: "cleared",
      observedDaysAfter: 7,
      notes: "Accessibility walk report.",
    },
    showName: true,
  };
  submittedId = (await post(member, "/api/reports", { ...report, submit: true })).id;
  draftId = (await post(member, "/api/reports/drafts", report)).id;
  courseId = (
    await post(member, "/api/reports/drafts", {
      courseOpen: true,
      speciesId: "paracheirodon-innesi",
      fishCount: 6,
      water: { volume: 40, volumeUnit: "L" },
      treatment: {
        agentSlug: "hydrogen-peroxide",
        stockPercent: 3,
        stockBasis: "w/v",
        statedConcentration: 25,
        intervalHours: 48,
      },
    })
  ).id;
  await post(member, `/api/reports/${courseId}/entries`, {
    kind: "dose",
    at: new Date(Date.now() - 3 * 86400_000).toISOString(),
    amountMl: 33,
    // 33 mL of 3 % in 40 L is about 25 mg/L, at or above the demo tetras' lowest adverse dose: the keeper acknowledges it.
    confirm: true,
  });
  await post(member, `/api/reports/${courseId}/entries`, {
    kind: "dose",
    at: new Date(Date.now() - 3600_000).toISOString(),
    amountMl: 33,
    confirm: true,
  });
}, 120_000);

afterAll(async () => {
  for (const c of Object.values(contexts)) await c?.close();
});

/** A page to visit: its address, and what to do on it before the checks (fill a form, open a step). */
interface Visit {
  name: string;
  url: () => string | Promise<string>;
  prepare?: (page: Page) => Promise<void>;
  /** Where the page ends up when it redirects after loading (a refusal streams its redirect). */
  waitForUrl?: RegExp;
  /** Text that is technical on purpose on this page (checked against the snake_case and ISO scans). */
  allow?: RegExp[];
}

async function firstLink(page: Page, listUrl: string, hrefPattern: RegExp): Promise<string> {
  await page.goto(`${baseUrl()}${listUrl}`, { waitUntil: "load" });
  await quiet(page);
  const hrefs = await page.locator("a[href]").evaluateAll((as) => as.map((a) => a.getAttribute("href") ?? ""));
  const href = hrefs.find((h) => hrefPattern.test(h));
  if (!href) throw new Error(`no link matching ${hrefPattern} on ${listUrl}`);
  return href;
}

const showPlannerResult = async (page: Page) => {
  await page.getByLabel("Water volume", { exact: true }).fill("60");
  await page.getByLabel("Target concentration (mg/L)").fill("25");
  await page.getByTestId("planner-result").waitFor();
};

const publicPages: Visit[] = [
  { name: "home", url: () => "/" },
  { name: "cautions", url: () => "/cautions" },
  { name: "evidence", url: () => "/evidence" },
  { name: "a group's evidence", url: () => "/evidence/tetras?agent=hydrogen-peroxide" },
  { name: "a group's evidence (no reports)", url: () => "/evidence/scaleless-catfish" },
  { name: "planner with a result", url: () => "/planner?agent=hydrogen-peroxide", prepare: showPlannerResult },
  { name: "not found", url: () => "/no-such-page" },
  { name: "forbidden", url: () => "/forbidden" },
];

const visits: Record<Role, Visit[]> = {
  visitor: [
    ...publicPages,
    { name: "sign in", url: () => "/sign-in" },
    { name: "sign in, address confirmed", url: () => "/sign-in?verified=1" },
    { name: "sign in, confirmation link expired", url: () => "/sign-in?verified=1&error=TOKEN_EXPIRED" },
    { name: "sign in, confirmation link invalid", url: () => "/sign-in?verified=1&error=INVALID_TOKEN" },
    { name: "sign in, password changed", url: () => "/sign-in?reset=1" },
    { name: "sign up", url: () => "/sign-up" },
    { name: "forgot password", url: () => "/forgot-password" },
    { name: "reset password without a link", url: () => "/reset-password" },
    { name: "reset password with a link", url: () => "/reset-password?token=abcdefghijklmnop" },
    { name: "reset password, link failed", url: () => "/reset-password?error=INVALID_TOKEN" },
  ],
  member: [
    ...publicPages,
    { name: "my reports", url: () => "/reports" },
    { name: "new report", url: () => "/reports/new" },
    { name: "a submitted report", url: () => `/reports/${submittedId}` },
    { name: "a draft report", url: () => `/reports/${draftId}` },
    ...[0, 1, 2, 3, 4].map((step) => ({
      name: `wizard step ${step + 1}`,
      url: () => `/reports/${draftId}/edit?step=${step}`,
    })),
    { name: "the course log", url: () => `/reports/${courseId}` },
    {
      name: "the course log's correction form",
      url: () => `/reports/${courseId}`,
      prepare: async (page) => {
        await page.getByRole("button", { name: "Correct or strike out" }).first().click();
        await page.getByRole("form", { name: "Correct this entry" }).waitFor();
      },
    },
    { name: "an admin page, refused", url: () => "/admin/members", waitForUrl: /\/forbidden/ },
  ],
  moderator: [
    { name: "home", url: () => "/" },
    { name: "review queue", url: () => "/review" },
    { name: "all reports", url: () => "/review/reports" },
    { name: "a report in review", url: () => `/review/${submittedId}` },
    {
      name: "a decided report in review",
      url: () => firstLink(pages.moderator!, "/review/reports?status=accepted", /^\/review\/[\w-]+$/),
    },
    { name: "the member's report page", url: () => `/reports/${submittedId}` },
    { name: "planner with a result", url: () => "/planner?agent=hydrogen-peroxide", prepare: showPlannerResult },
  ],
  admin: [
    { name: "home", url: () => "/" },
    { name: "members", url: () => "/admin/members" },
    { name: "catalogue", url: () => "/admin/catalogue" },
    { name: "settings", url: () => "/admin/settings" },
    { name: "exchange", url: () => "/admin/exchange" },
    { name: "mail", url: () => "/admin/mail" },
    { name: "a mail", url: () => firstLink(pages.admin!, "/admin/mail", /^\/admin\/mail\/[\w.-]+$/) },
    { name: "background work", url: () => "/admin/jobs" },
    { name: "review queue", url: () => "/review" },
    { name: "a report in review", url: () => `/review/${submittedId}` },
  ],
};

interface AxeResult {
  violations: {
    id: string;
    impact: string | null;
    help: string;
    nodes: { target: unknown[]; failureSummary?: string }[];
  }[];
}

async function runAxe(page: Page): Promise<AxeResult> {
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axeSource });
  return page.evaluate(
    (tags) =>
      (window as unknown as { axe: { run: (ctx: Document, opts: unknown) => Promise<AxeResult> } }).axe.run(document, {
        runOnly: { type: "tag", values: tags },
        resultTypes: ["violations"],
      }),
    WCAG_TAGS,
  ) as Promise<AxeResult>;
}

// Enum values and field paths look like snake_case or dotted.paths; ISO times like 2026-11-15T10:00 or 2026-11-15.
const SNAKE = /\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b/g;
const FIELD_PATH = /\b[a-z][a-zA-Z]*\.[a-z][a-zA-Z]+\b/g;
const ISO = /\b\d{4}-\d{2}-\d{2}(?:[T ]\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?(?:Z|[+-]\d{2}:?\d{2})?)?\b/g;
// Text that is legitimately technical: e-mail addresses and domain names, and file names in the mail outbox.
const ALWAYS_ALLOWED = [
  /\b[\w.+-]+@[\w-]+(?:\.[\w-]+)+\b/g,
  /\b[\w-]+\.(?:org|com|net|eml|csv|json|jpg|jpeg|png|webp)\b/gi,
];

function leaks(text: string, allow: RegExp[] = []): string[] {
  let scrubbed = text;
  for (const re of [...ALWAYS_ALLOWED, ...allow]) scrubbed = scrubbed.replace(re, " ");
  const found = new Set<string>();
  for (const re of [SNAKE, FIELD_PATH, ISO]) for (const m of scrubbed.matchAll(re)) found.add(m[0]);
  return [...found];
}

/** Runs `fn`; if the page navigated under it (a redirect that arrives after load), waits for the new page and runs it again. */
async function settled<T>(page: Page, fn: () => Promise<T>): Promise<T> {
  try {
    return await fn();
  } catch (err) {
    if (!/Execution context was destroyed|navigat/i.test(String(err))) throw err;
    await page.waitForLoadState("load");
    await quiet(page);
    return fn();
  }
}

// Client tables and charts fill in after load; some pages poll, so "idle" is waited for only briefly.
const quiet = (page: Page) => page.waitForLoadState("networkidle", { timeout: 5000 }).catch(() => undefined);

async function checkAtWidth(page: Page, where: string, visit: Visit, width: number): Promise<string[]> {
  const problems: string[] = [];
  const result = await settled(page, () => runAxe(page));
  const at = `${where} · ${width} px (${page.url().replace(baseUrl(), "")})`;
  for (const v of result.violations) {
    for (const n of v.nodes)
      problems.push(
        `${at}: [${v.id}] ${JSON.stringify(n.target)} — ${v.help}${n.failureSummary ? `\n      ${n.failureSummary.replace(/\n/g, " ")}` : ""}`,
      );
  }
  if (width === 390) {
    const { scroll, inner, culprits } = await settled(page, () =>
      page.evaluate(() => {
        const inner = window.innerWidth;
        // The innermost elements that stick out, to say where to look.
        const out = Array.from(document.body.querySelectorAll("*")).filter(
          (el) => el.getBoundingClientRect().right > inner + 0.5,
        );
        const innermost = out.filter((el) => !out.some((o) => o !== el && el.contains(o)));
        const culprits = innermost
          .slice(0, 4)
          .map(
            (el) =>
              `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}${typeof el.className === "string" && el.className ? `.${el.className.split(" ").slice(0, 4).join(".")}` : ""} "${(el.textContent ?? "").trim().slice(0, 40)}" (${Math.round(el.getBoundingClientRect().right)} px)`,
          );
        return { scroll: document.scrollingElement!.scrollWidth, inner, culprits };
      }),
    );
    if (scroll > inner)
      problems.push(`${at}: scrolls sideways (${scroll} px wide in ${inner} px); look at: ${culprits.join("; ")}`);
  }
  const text = await settled(page, () => page.evaluate(() => document.body.innerText));
  const leaked = leaks(text, visit.allow);
  if (leaked.length) problems.push(`${at}: internal values reach the reader: ${leaked.join(", ")}`);
  return problems;
}

/** One visit, checked at each width: loaded once at the desktop width, then narrowed to the phone's. */
async function check(page: Page, role: Role, visit: Visit): Promise<string[]> {
  const where = `${role} · ${visit.name}`;
  await page.setViewportSize({ width: WIDTHS[0], height: 900 });
  const url = await visit.url();
  await page.goto(`${baseUrl()}${url}`, { waitUntil: "load" });
  if (visit.waitForUrl) await page.waitForURL(visit.waitForUrl);
  await quiet(page);
  if (visit.prepare) await visit.prepare(page);
  const problems: string[] = [];
  for (const width of WIDTHS) {
    if (width !== WIDTHS[0]) {
      await page.setViewportSize({ width, height: 844 });
      // Let layout, and components that follow the width, catch up.
      await page.waitForTimeout(300);
    }
    problems.push(...(await checkAtWidth(page, where, visit, width)));
  }
  return problems;
}

describe("every page is accessible, fits a phone and speaks plainly", () => {
  for (const role of ["visitor", "member", "moderator", "admin"] as const) {
    it(`as ${role === "visitor" ? "a visitor" : `the demo ${role}`}, at ${WIDTHS.join(" and ")} px`, async () => {
      const page = pages[role]!;
      const problems: string[] = [];
      for (const visit of visits[role]) problems.push(...(await check(page, role, visit)));
      if (problems.length) console.log(problems.join("\n"));
      expect(problems, problems.join("\n")).toEqual([]);
    }, 600_000);
  }
});

describe("the checks themselves", () => {
  it("axe finds what it should on a page made to fail", async () => {
    const page = pages.visitor!;
    await page.goto(`${baseUrl()}/cautions`, { waitUntil: "load" });
    await page.evaluate(() => {
      document.documentElement.removeAttribute("lang");
      document.body.insertAdjacentHTML(
        "beforeend",
        '<img src="/favicon.ico"><button></button><p style="color:#bbb;background:#fff">pale text</p>',
      );
    });
    const ids = (await runAxe(page)).violations.map((v) => v.id);
    expect(ids).toEqual(expect.arrayContaining(["html-has-lang", "image-alt", "button-name", "color-contrast"]));
  });

  it("finds snake_case values, field paths and ISO times, and passes plain words and e-mail addresses", () => {
    expect(leaks("Status: awaiting_review")).toEqual(["awaiting_review"]);
    expect(leaks("dose.concentration must be above 0")).toEqual(["dose.concentration"]);
    expect(leaks("Filed 2026-11-15T10:04:00.000Z")).toEqual(["2026-11-15T10:04:00.000Z"]);
    expect(leaks("Filed 15 November 2026 by member@example.org, 3 days ago. Median 24.5 mg/L.")).toEqual([]);
  });
});
