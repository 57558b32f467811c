import { describe, expect, inject, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("signing in", () => {
  it("shows the demo member's name after signing in through the form", async () => {
    const page = await browser().newPage();
    await signInAs(page, "member@example.org");
    expect(await page.getByTestId("signed-in-as").textContent()).toContain("Priya Sandwell");
    // The demo club says on every page that it is invented.
    expect(await page.getByTestId("demo-banner").textContent()).toMatch(/invented/);
    // A member is not shown the admin links, and the admin page itself refuses them.
    expect(await page.getByRole("link", { name: "Members" }).count()).toBe(0);
    // The server refuses the page; the redirect may arrive while the page streams, so wait for it.
    await page.goto(`${baseUrl()}/admin/members`);
    await page.waitForURL(/\/forbidden/);
    expect(await page.getByRole("heading", { name: "Not for your role" }).count()).toBe(1);
    await page.close();
  });

  it("brings a visitor who opens the report form back to it after signing in", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/reports/new`);
    await page.waitForURL(/\/sign-in\?next=%2Freports%2Fnew/);
    await page.getByLabel("E-mail").fill("member2@example.org");
    await page.getByLabel("Password").fill(inject("demoPassword"));
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => url.pathname === "/reports/new");
    expect(new URL(page.url()).pathname).toBe("/reports/new");
    await page.close();
  });

  it("says what is wrong when the password does not match", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("member2@example.org");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // Next.js keeps an empty route announcer with role=alert; ours is the one in the form.
    const alert = page.locator("form [role=alert]");
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(/do not match an account/);
    await page.close();
  });

  it("lets the demo admin sort the members table and see every demo account", async () => {
    const page = await browser().newPage();
    await signInAs(page, "admin@example.org");
    await page.goto(`${baseUrl()}/admin/members`);
    // Twelve demo accounts, and any the other browser tests signed up.
    const counter = page.getByText(/^\d+ members$/);
    await counter.waitFor();
    expect(Number((await counter.textContent())!.split(" ")[0])).toBeGreaterThanOrEqual(12);
    await page.getByRole("button", { name: /^E-mail/ }).click();
    await page.getByRole("columnheader", { name: /E-mail/ }).and(page.locator("[aria-sort=ascending]")).waitFor();
    // Sorted by name, Ade Okonrin leads; by e-mail, the admin account does (once the page arrives).
    await page.locator("tbody tr").first().filter({ hasText: "admin@example.org" }).waitFor();
    expect(await page.locator("tbody tr").first().textContent()).toContain("Orla Quillfeather");
    await page.screenshot({ path: "tests/e2e/.artifacts/members.png", fullPage: true });
    await page.close();
  });
});
