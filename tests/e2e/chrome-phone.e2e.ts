import { describe, expect, it } from "vitest";
import sharp from "sharp";
import type { Browser, Page } from "playwright-core";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();
const phone = { width: 390, height: 844 };
const desktop = { width: 1280, height: 900 };

async function pageAt(b: Browser, viewport: { width: number; height: number }, email: string): Promise<Page> {
  const page = await b.newPage({ viewport });
  await signInAs(page, email);
  return page;
}

/** How far the page can scroll sideways (0 when nothing is wider than the window). */
const sidewaysScroll = (page: Page) =>
  page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

const adminLinks = [
  "Evidence",
  "Dose planner",
  "Cautions",
  "My reports",
  /^Review \(\d+\)$/,
  "Members",
  "Catalogue",
  "Club settings",
  "Import/export",
  "Mail outbox",
  "Background work",
];

describe("the header", () => {
  it("under 640 px folds into a Menu that opens by keyboard, shows every link an officer has, and closes on Escape", async () => {
    const page = await pageAt(browser(), phone, "admin@example.org");
    expect(await page.getByTestId("nav-bar").isVisible()).toBe(false);
    const menu = page.getByTestId("header-menu");
    const button = menu.locator("summary");
    expect(await button.getAttribute("aria-expanded")).toBe("false");
    // Reach the menu button from the top of the page with Tab alone, then open it with Enter.
    await page.locator("body").focus();
    for (let i = 0; i < 8 && !(await button.evaluate((el) => el === document.activeElement)); i++)
      await page.keyboard.press("Tab");
    expect(await button.evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.press("Enter");
    await expect.poll(() => button.getAttribute("aria-expanded")).toBe("true");
    const panel = page.locator(`#${await button.getAttribute("aria-controls")}`);
    for (const name of adminLinks) expect(await panel.getByRole("link", { name }).isVisible(), String(name)).toBe(true);
    await page.keyboard.press("Tab");
    expect(await page.evaluate(() => document.activeElement?.textContent)).toBe("Evidence");
    await page.keyboard.press("Escape");
    await expect.poll(() => button.getAttribute("aria-expanded")).toBe("false");
    expect(await panel.getByRole("link", { name: "Members" }).isVisible()).toBe(false);
    expect(await button.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await sidewaysScroll(page)).toBe(0);
    await page.screenshot({ path: "tests/e2e/.artifacts/header-390.png" });
    await page.close();
  });

  it("from 640 px is a single row for an officer, with the officers' pages one click away", async () => {
    for (const width of [640, 1280]) {
      const page = await pageAt(browser(), { width, height: 800 }, "admin@example.org");
      expect(await page.getByTestId("header-menu").isVisible()).toBe(false);
      const bar = page.locator("header").first();
      const box = (await bar.boundingBox())!;
      expect(box.height, `header height at ${width} px`).toBeLessThan(64);
      const nav = page.getByTestId("nav-bar");
      for (const name of adminLinks.slice(0, 5))
        expect(
          await nav.getByRole("link", { name: name === "Dose planner" && width < 1024 ? "Planner" : name }).isVisible(),
          `${name} at ${width}`,
        ).toBe(true);
      await nav.locator("summary", { hasText: "Admin" }).click();
      for (const name of adminLinks.slice(5))
        expect(await nav.getByRole("link", { name }).isVisible(), `${name} at ${width}`).toBe(true);
      expect(await sidewaysScroll(page)).toBe(0);
      if (width === 1280) await page.screenshot({ path: "tests/e2e/.artifacts/header-1280.png" });
      await page.close();
    }
  });
});

describe("the review queue", () => {
  it("at 390 px shows each waiting report as a card, without sideways scrolling", async () => {
    const page = await pageAt(browser(), phone, "moderator@example.org");
    await page.goto(`${baseUrl()}/review`);
    const card = page.getByTestId("table-row").first();
    await card.waitFor();
    expect(await card.evaluate((el) => getComputedStyle(el).display)).toBe("grid");
    // Each cell is led by its column's name.
    expect(
      await card
        .locator("td")
        .nth(1)
        .evaluate((el) => getComputedStyle(el, "::before").content),
    ).toBe('"Group"');
    const cardBox = (await card.boundingBox())!;
    expect(cardBox.width).toBeLessThanOrEqual(390);
    expect(await sidewaysScroll(page)).toBe(0);
    await page.screenshot({ path: "tests/e2e/.artifacts/queue-390.png", fullPage: true });
    await page.close();
  });

  it("moves with j and k, opens with Enter, lists its keys on ?, and ignores keys typed into a field", async () => {
    const page = await pageAt(browser(), desktop, "moderator@example.org");
    await page.goto(`${baseUrl()}/review`);
    const links = page.locator("a[data-row-link]");
    await links.nth(1).waitFor();
    const help = page.getByTestId("shortcut-help").locator("dl");
    // In a field, "?" and "j" are the field's, not shortcuts.
    await page.getByLabel("Flag").focus();
    await page.keyboard.press("?");
    expect(await help.isVisible()).toBe(false);
    await page.locator("h1").click();
    await page.keyboard.press("?");
    expect(await help.isVisible()).toBe(true);
    expect(await help.textContent()).toContain("open the report you are on");
    await page.keyboard.press("j");
    await page.keyboard.press("j");
    expect(await links.nth(1).evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.press("k");
    expect(await links.nth(0).evaluate((el) => el === document.activeElement)).toBe(true);
    const first = await links.nth(0).getAttribute("href");
    const second = await links.nth(1).getAttribute("href");
    await page.keyboard.press("Enter");
    await page.waitForURL(`**${first}`);
    // On the report, j goes on to the next one in the queue; no key chooses a decision.
    await page.getByTestId("review-queue-nav").waitFor();
    await page.keyboard.press("j");
    await page.waitForURL(`**${second}`);
    await page
      .getByTestId("review-queue-nav")
      .getByRole("link", { name: /Previous/ })
      .waitFor();
    expect(await page.locator("input[type=radio]:checked").count()).toBe(0);
    await page.close();
  });
});

describe("photo upload", () => {
  it("shows a file the server refuses in red with its reason and a Retry, and a good one in green", async () => {
    const page = await pageAt(browser(), phone, "member@example.org");
    const draft = await page.request.post(`${baseUrl()}/api/reports/drafts`, {
      data: { speciesId: "paracheirodon-innesi", fishCount: 4 },
      headers: { origin: baseUrl() },
    });
    expect(draft.status()).toBe(201);
    const id = (await draft.json()).id as string;
    await page.goto(`${baseUrl()}/reports/${id}/edit?step=4`);
    // The picker stays disabled until the page is live, so a file chosen earlier is never silently dropped.
    const served = await (await page.request.get(`${baseUrl()}/reports/${id}/edit?step=4`)).text();
    expect(served).toMatch(/<input[^>]*disabled=""[^>]*data-testid="photo-input"/);
    await expect.poll(() => page.getByTestId("photo-input").isEnabled()).toBe(true);
    const posts: string[] = [];
    page.on(
      "request",
      (r) => r.method() === "POST" && r.url().endsWith(`/api/reports/${id}/photos`) && posts.push(r.url()),
    );

    // A text file with a photo's name: the server sniffs the bytes and refuses it.
    await page.getByTestId("photo-input").setInputFiles({
      name: "holiday.jpg",
      mimeType: "image/jpeg",
      buffer: Buffer.from("these are words, not pixels\n".repeat(40)),
    });
    const bad = page.getByTestId("upload-item").filter({ hasText: "holiday.jpg" });
    await bad.and(page.locator("[data-state=failed]")).waitFor();
    expect(await bad.textContent()).toContain("not added.");
    expect(await bad.textContent()).toContain("is not a JPEG, PNG, WebP or AVIF image");
    expect(await bad.evaluate((el) => getComputedStyle(el).borderLeftColor)).toBe("rgb(179, 38, 30)"); // alarm-500
    expect(await bad.locator("svg").first().getAttribute("class")).toContain("lucide-circle-x");
    const retry = bad.getByRole("button", { name: "Retry holiday.jpg" });
    expect(await retry.isVisible()).toBe(true);

    const good = await sharp({ create: { width: 640, height: 480, channels: 3, background: "#2f7a63" } })
      .jpeg()
      .toBuffer();
    await page.getByTestId("photo-input").setInputFiles({ name: "tank.jpg", mimeType: "image/jpeg", buffer: good });
    const ok = page.getByTestId("upload-item").filter({ hasText: "tank.jpg" });
    await ok.and(page.locator("[data-state=done]")).waitFor();
    expect(await ok.textContent()).toContain("added to the report.");
    expect(await ok.evaluate((el) => getComputedStyle(el).borderLeftColor)).toBe("rgb(47, 122, 99)"); // peat-500
    expect(await ok.getByRole("button", { name: /Retry/ }).count()).toBe(0);

    // Retry sends the same file again; the server's answer (still a refusal) comes back in the same row.
    const before = posts.length;
    await retry.click();
    await expect.poll(() => posts.length).toBe(before + 1);
    await bad.and(page.locator("[data-state=failed]")).waitFor();
    expect(await page.getByTestId("upload-item").count()).toBe(2);
    expect(await sidewaysScroll(page)).toBe(0);
    await page.screenshot({ path: "tests/e2e/.artifacts/upload-390.png", fullPage: true });
    await page.close();
  });
});

describe("at 390 px", () => {
  it("no page changed for phones scrolls sideways", async () => {
    const admin = await pageAt(browser(), phone, "admin@example.org");
    const member = await pageAt(browser(), phone, "member@example.org");
    const visitor = await browser().newPage({ viewport: phone });
    const wide: string[] = [];
    const check = async (page: Page, path: string) => {
      await page.goto(`${baseUrl()}${path}`);
      await page.waitForLoadState("networkidle");
      const over = await sidewaysScroll(page);
      if (over > 0) wide.push(`${path} (${over} px)`);
    };
    for (const path of ["/", "/evidence", "/cautions", "/sign-in"]) await check(visitor, path);
    for (const path of ["/", "/reports"]) await check(member, path);
    for (const path of [
      "/review",
      "/review/reports",
      "/admin/members",
      "/admin/catalogue",
      "/admin/mail",
      "/admin/settings",
    ])
      await check(admin, path);
    await admin.goto(`${baseUrl()}/review`);
    await admin.locator("a[data-row-link]").first().click();
    await admin.getByTestId("review-queue-nav").waitFor();
    if ((await sidewaysScroll(admin)) > 0) wide.push(admin.url());
    expect(wide).toEqual([]);
    await Promise.all([admin.close(), member.close(), visitor.close()]);
  });
});
