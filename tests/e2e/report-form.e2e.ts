import { describe, expect, it } from "vitest";
import sharp from "sharp";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("filing a report", () => {
  it("walks the steps, survives a reload, uploads a photo and submits for review", async () => {
    const page = await browser().newPage();
    await signInAs(page, "member2@example.org");
    await page.goto(`${baseUrl()}/reports/new`);

    await page.getByLabel("Search species").fill("neon");
    await page.getByLabel("Species", { exact: true }).selectOption({ label: "Neon tetra (Paracheirodon innesi)" });
    await page.getByLabel("Fish treated").fill("8");
    await page.getByLabel("Size").selectOption("adult");
    await page.getByLabel("Condition treated").selectOption("white-spot");
    await page.getByLabel("Course started on").fill("2026-11-10");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/\/reports\/[\w-]+\/edit\?step=1/);

    // A reload keeps the draft and the step.
    await page.reload();
    await page.getByLabel("Water volume treated").fill("50");
    await page.getByLabel("Water temperature").fill("25");
    await page.getByLabel("Kind of tank").selectOption("bare");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/step=2/);

    await page.getByLabel("Stock strength (%)").fill("3");
    await page.getByLabel("mL added per dose (largest dose)").fill("40");
    // 40 mL × 30 mg/mL / 50 L = 24 mg/L.
    await page.getByTestId("computed-dose").filter({ hasText: "24.0 mg/L" }).waitFor();
    await page.getByLabel("Number of doses").fill("2");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.getByText("Give the hours between doses when there was more than one.").waitFor();
    await page.getByLabel("Hours between doses").fill("48");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/step=3/);

    await page.getByLabel("Fish lost").fill("0");
    await page.getByLabel("Distress seen after dosing").selectOption("mild");
    await page.getByLabel("How the condition ended").selectOption("cleared");
    await page.getByLabel("Days watched after the last dose").fill("8");
    await page.getByRole("button", { name: "Save and continue" }).click();
    await page.waitForURL(/step=4/);

    const photo = await sharp({ create: { width: 800, height: 600, channels: 3, background: "#2f7a63" } })
      .jpeg()
      .toBuffer();
    await page.getByTestId("photo-input").setInputFiles({ name: "tank.jpg", mimeType: "image/jpeg", buffer: photo });
    await page.getByText("tank.jpg: added").waitFor();
    await page.getByTestId("photo-list").locator("img").first().waitFor();

    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.waitForURL(/submitted=1/);
    await page.getByText("Awaiting review").first().waitFor();
    expect(await page.getByTestId("computed-concentration").textContent()).toBe("24.0 mg/L");
    const img = page.getByTestId("report-photos").locator("img").first();
    await img.waitFor();
    expect(await img.evaluate((el: HTMLImageElement) => el.naturalWidth)).toBe(320);
    expect(await page.getByTestId("history").textContent()).toContain("submitted it for review");
    await page.goto(`${baseUrl()}/reports`);
    await page.getByRole("link", { name: "Neon tetra" }).first().waitFor();
    await page.screenshot({ path: "tests/e2e/.artifacts/my-reports.png", fullPage: true });
    await page.close();
  });
});

describe("an incomplete draft", () => {
  for (const width of [1280, 390]) {
    it(`answers "submit" with a plain checklist that leads to each step, and each step starts at its heading (${width} px)`, async () => {
      const context = await browser().newContext({ viewport: { width, height: 844 } });
      const page = await context.newPage();
      await signInAs(page, "member2@example.org");
      // The fish step only: water, treatment and outcome are missing.
      const draft = await page.request.post(`${baseUrl()}/api/reports/drafts`, {
        headers: { origin: baseUrl() },
        data: {
          speciesId: "paracheirodon-innesi",
          fishCount: 4,
          sizeClass: "adult",
          conditionSlug: "white-spot",
          startedOn: "2026-11-10",
        },
      });
      expect(draft.status()).toBe(201);
      const { id } = (await draft.json()) as { id: string };

      // Saving a step moves the focus to the next step's heading.
      await page.goto(`${baseUrl()}/reports/${id}/edit?step=0`);
      await page.getByRole("button", { name: "Save and continue" }).click();
      await page.waitForURL(/step=1/);
      await page.waitForFunction(() => document.activeElement?.getAttribute("data-testid") === "step-heading");
      expect(await page.evaluate(() => document.activeElement?.textContent)).toBe("Step 2 of 5: Water");

      await page.goto(`${baseUrl()}/reports/${id}/edit?step=4`);
      await page.getByRole("button", { name: "Submit for review" }).click();
      const checklist = page.getByTestId("submit-checklist");
      await checklist.waitFor();
      const text = (await checklist.innerText()) ?? "";
      expect(text).toMatch(/not submitted yet/);
      // One line per field to fix, named by its step, in the schema's own plain sentences.
      expect(text).toContain("Step 2, Water: Choose the kind of tank.");
      expect(text).toContain("Step 3, Treatment: Choose the treatment agent.");
      expect(text).toContain("Step 4, Outcome: Choose how the condition ended.");
      expect(text).not.toContain("Step 1, Fish");
      // Nothing for programs: no field path, enum value or list of allowed values.
      expect(text).not.toMatch(/\b[a-z]+[A-Z]\w*\b|\b[a-z]+_[a-z_]+\b|\b[a-z]+\.[a-z]+\b|must be one of/);
      const items = checklist.getByRole("button");
      expect(await items.count()).toBeGreaterThanOrEqual(3);
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);

      // Each item leads to its step with the cursor in the field to fix.
      await items.filter({ hasText: "Step 2, Water" }).first().click();
      await page.getByTestId("step-heading").filter({ hasText: "Step 2 of 5: Water" }).waitFor();
      await page.waitForFunction(() => ["INPUT", "SELECT"].includes(document.activeElement?.tagName ?? ""));
      expect(await page.evaluate(() => document.activeElement?.id)).toMatch(/-(volume|temperature|setting)$/);
      await context.close();
    });
  }
});
