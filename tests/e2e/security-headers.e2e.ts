import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { inject } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

// The web surface of a production build (the server of global-setup.ts): security headers on pages and API
// answers, a nonce that the page's scripts carry, the origin rule through the real server, and pages that
// still run in Chromium under the policy without a single CSP violation.

const browser = useBrowser();

const pages = [
  "/",
  "/planner",
  "/evidence?agent=hydrogen-peroxide",
  "/evidence/livebearers?agent=hydrogen-peroxide",
  "/cautions",
  "/sign-in",
  "/sign-up",
  "/forgot-password",
  "/no-such-page",
];
const apis = [
  "/api/health",
  "/api/health/live",
  "/api/catalogue",
  "/api/summaries?agent=hydrogen-peroxide",
  "/api/export/summaries.csv?agent=hydrogen-peroxide",
  "/api/dose?agent=hydrogen-peroxide",
  "/api/reports",
  "/api/auth/get-session",
  "/api/openapi.json",
  "/api/no/such/thing",
];

function expectCommonHeaders(res: Response, where: string) {
  const h = res.headers;
  const csp = h.get("content-security-policy") ?? "";
  for (const directive of ["object-src 'none'", "base-uri 'none'", "frame-ancestors 'none'"])
    expect(csp, `${where}: ${directive}`).toContain(directive);
  expect(h.get("x-content-type-options"), where).toBe("nosniff");
  expect(h.get("referrer-policy"), where).toBe("same-origin");
  expect(h.get("permissions-policy"), where).toMatch(/camera=\(\)/);
  expect(h.get("x-frame-options"), where).toBe("DENY");
  // Served over plain http here: no HSTS, and no upgrade of the page's own loads.
  expect(h.get("strict-transport-security"), where).toBeNull();
  expect(csp, where).not.toContain("upgrade-insecure-requests");
}

describe("headers on a production build", () => {
  it("every page carries the CSP with a fresh nonce that each of its scripts carries", async () => {
    const nonces = new Set<string>();
    for (const p of pages) {
      const res = await fetch(`${baseUrl()}${p}`, { redirect: "manual" });
      expectCommonHeaders(res, p);
      const csp = res.headers.get("content-security-policy")!;
      const nonce = csp.match(/script-src 'self' 'nonce-([A-Za-z0-9+/=]+)' 'strict-dynamic'/)?.[1];
      expect(nonce, p).toBeTruthy();
      expect(csp, p).not.toContain("unsafe-eval");
      nonces.add(nonce!);
      const html = await res.text();
      const scripts = html.match(/<script\b[^>]*>/g) ?? [];
      expect(scripts.length, p).toBeGreaterThan(0);
      for (const tag of scripts) expect(tag, p).toContain(`nonce="${nonce}"`);
    }
    expect(nonces.size).toBe(pages.length);
  });

  it("every API answer carries a policy that allows nothing, and the other headers", async () => {
    for (const a of apis) {
      const res = await fetch(`${baseUrl()}${a}`);
      expectCommonHeaders(res, a);
      expect(res.headers.get("content-security-policy"), a).toMatch(/^default-src 'none'/);
      expect(res.headers.get("cross-origin-resource-policy"), a).toBe("same-origin");
      await res.arrayBuffer();
    }
  });

  it("adds HSTS and upgrade-insecure-requests when the request came over https", async () => {
    for (const p of ["/", "/api/health"]) {
      const res = await fetch(`${baseUrl()}${p}`, { headers: { "x-forwarded-proto": "https" } });
      expect(res.headers.get("strict-transport-security"), p).toBe("max-age=31536000");
      if (p === "/") expect(res.headers.get("content-security-policy")).toContain("upgrade-insecure-requests");
      await res.arrayBuffer();
    }
  });

  it("answers unknown API paths and wrong methods in the error envelope", async () => {
    const missing = await fetch(`${baseUrl()}/api/no/such/thing`, { method: "POST" });
    expect(missing.status).toBe(404);
    expect((await missing.json()).error.code).toBe("not_found");
    const wrong = await fetch(`${baseUrl()}/api/catalogue`, { method: "DELETE" });
    expect(wrong.status).toBe(405);
    expect(wrong.headers.get("allow")).toBe("GET, HEAD, OPTIONS");
    expect((await wrong.json()).error.code).toBe("method_not_allowed");
    const head = await fetch(`${baseUrl()}/api/health/live`, { method: "HEAD" });
    expect(head.status).toBe(200);
  });

  it("refuses a write with a session cookie but no same-origin Origin, in our routes and in better-auth's", async () => {
    // Node's fetch sends Sec-Fetch-Mode, which better-auth takes for a browser: it then wants an Origin too.
    const signIn = await fetch(`${baseUrl()}/api/auth/sign-in/email`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: baseUrl() },
      body: JSON.stringify({ email: "member@example.org", password: inject("demoPassword") }),
    });
    expect(signIn.status).toBe(200);
    const cookie = signIn.headers
      .getSetCookie()
      .map((c) => c.split(";")[0])
      .join("; ");
    const draft = (headers: Record<string, string>) =>
      fetch(`${baseUrl()}/api/reports/drafts`, {
        method: "POST",
        headers: { "content-type": "application/json", cookie, ...headers },
        body: JSON.stringify({ fishCount: 1 }),
      });
    const bare = await draft({});
    expect(bare.status).toBe(403);
    expect((await bare.json()).error.code).toBe("forbidden");
    expect((await draft({ origin: "https://elsewhere.example.org" })).status).toBe(403);
    expect((await draft({ origin: baseUrl() })).status).toBe(201);
    const signOut = (origin: string) =>
      fetch(`${baseUrl()}/api/auth/sign-out`, {
        method: "POST",
        headers: { "content-type": "application/json", cookie, origin },
        body: "{}",
      });
    expect((await signOut("https://elsewhere.example.org")).status).toBe(403);
    expect((await signOut(baseUrl())).status).toBe(200);
  });
});

/** Opens a page and records every CSP violation it reports, from the console and from the DOM event. */
async function watch(page: Page): Promise<string[]> {
  const violations: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to (load|execute|apply|connect|frame)/i.test(m.text()))
      violations.push(`${page.url()}: ${m.text()}`);
  });
  page.on("pageerror", (e) => violations.push(`page error: ${e.message}`));
  await page.addInitScript(() => {
    document.addEventListener("securitypolicyviolation", (e) =>
      console.error(`Content Security Policy violation: ${e.violatedDirective} ${e.blockedURI}`),
    );
  });
  return violations;
}

describe("pages under the policy in Chromium", () => {
  it("render, hydrate and draw their charts with no CSP violation", async () => {
    const page = await browser().newPage();
    const violations = await watch(page);

    await page.goto(`${baseUrl()}/evidence/livebearers?agent=hydrogen-peroxide`);
    // Observable Plot's charts come drawn by the server: the risk chart inline at phone width, the others as SVG
    // images from our own origin (img-src 'self'), in a system font since an image cannot reach the page's fonts.
    const img = page.getByTestId("dose-chart").locator("img");
    await img.scrollIntoViewIfNeeded();
    await page.waitForFunction(
      () => (document.querySelector('[data-testid="dose-chart"] img') as HTMLImageElement | null)?.naturalWidth,
    );
    const src = await img.evaluate((i: HTMLImageElement) => i.currentSrc);
    const svg = await (await fetch(src)).text();
    expect(svg.match(/<circle/g)?.length).toBeGreaterThan(3);
    expect(svg).toContain('font-family="system-ui, sans-serif"');

    // The planner answers as one types: hydrated React under the nonce policy.
    await page.goto(`${baseUrl()}/planner`);
    await page.getByLabel("Treatment").selectOption("hydrogen-peroxide");
    await page.getByLabel("Water volume", { exact: true }).fill("40");
    await page.getByLabel("Target concentration (mg/L)").fill("25");
    await page.getByTestId("dose-ml").waitFor();

    // Tailwind's stylesheet applies (a styled page, not bare HTML).
    const bodyFont = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(bodyFont).not.toMatch(/^"?Times/);

    // Signed in: the report form and the member's list, with client-side navigation.
    await signInAs(page, "member@example.org");
    await page.goto(`${baseUrl()}/reports/new`);
    await page.getByRole("button", { name: "Save and continue" }).first().waitFor();
    await page.goto(`${baseUrl()}/reports`);
    await page.getByRole("link", { name: "Evidence" }).first().click();
    await page.waitForURL(/\/evidence/);
    await page.getByTestId("evidence-table").waitFor();

    expect(violations).toEqual([]);
    await page.close();
  });
});
