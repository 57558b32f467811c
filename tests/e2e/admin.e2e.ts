import { describe, expect, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("club officers", () => {
  it("change the confidence level, which recomputes the summaries, and are told what to fix", async () => {
    const page = await browser().newPage();
    await signInAs(page, "admin@example.org");
    await page.goto(`${baseUrl()}/admin/settings`);
    await page.getByLabel("Minimum reports before a summary can be leaned on").fill("zero");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText("Some settings need fixing; nothing was changed.").waitFor();
    expect(await page.locator("#minReports-error").textContent()).toMatch(/whole number/);

    await page.getByLabel("Minimum reports before a summary can be leaned on").fill("5");
    await page.getByLabel("Confidence level of intervals").selectOption("90");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/summary is being recomputed/).waitFor();
    await page.goto(`${baseUrl()}/evidence?agent=hydrogen-peroxide`);
    await page.getByText("Intervals are 90 %").waitFor();

    await page.goto(`${baseUrl()}/admin/settings`);
    await page.getByLabel("Confidence level of intervals").selectOption("95");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText(/summary is being recomputed/).waitFor();
    await page.close();
  });

  it("read the verification mail of a new member in the outbox and edit the catalogue", async () => {
    const visitor = await browser().newPage();
    await visitor.goto(`${baseUrl()}/sign-up`);
    await visitor.getByLabel("Display name").fill("Wren Newcomer");
    await visitor.getByLabel("E-mail").fill("wren@example.org");
    await visitor.getByLabel("Password", { exact: true }).fill("a-long-enough-password");
    await visitor.getByLabel("Password again").fill("a-long-enough-password");
    await visitor.getByRole("button", { name: "Create account" }).click();
    await visitor.getByText("Check your inbox").waitFor();

    const admin = await browser().newPage();
    await signInAs(admin, "admin@example.org");
    await admin.goto(`${baseUrl()}/admin/mail`);
    await admin.getByRole("link", { name: "Confirm your e-mail address for Tanklore" }).first().click();
    const link = admin.locator("pre a").first();
    const href = await link.getAttribute("href");
    expect(href).toContain("/api/auth/verify-email?token=");
    // The link works: opening it confirms the address and signs the newcomer in.
    await visitor.goto(href!);
    await visitor.getByTestId("signed-in-as").filter({ hasText: "Wren Newcomer" }).waitFor();

    await admin.goto(`${baseUrl()}/admin/catalogue?list=conditions`);
    await admin.getByRole("button", { name: "Add new" }).click();
    await admin.getByLabel("Slug").fill("hole-in-the-head");
    await admin.getByLabel("Name", { exact: true }).fill("Hole-in-the-head");
    await admin.getByRole("button", { name: "Add", exact: true }).click();
    await admin.getByText("Added.").waitFor();
    await admin.getByText("hole-in-the-head").first().waitFor();
    await visitor.close();
    await admin.close();
  });
});
