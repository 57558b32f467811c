import { describe, expect, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("the course log on a phone", () => {
  it("shows the next dose and the correction form at 390 px without sideways scroll, and the course on the member's home", async () => {
    const page = await browser().newPage({ viewport: { width: 390, height: 844 } });
    await signInAs(page, "member@example.org");
    // An open course with one dose, made through the API from the page (same origin, the member's session).
    const id = await page.evaluate(async () => {
      const post = (url: string, body: unknown) =>
        fetch(url, {
          method: "POST",
          headers: { "content-type": "application/json" },
          body: JSON.stringify(body),
        }).then((r) => r.json());
      const draft = await post("/api/reports/drafts", {
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
      });
      // In the demo club a tetra dose of 19.2 mg/L went badly, so 24.75 mg/L trips the guard rail: acknowledged here.
      const first = await fetch(`/api/reports/${draft.id}/entries`, {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ kind: "dose", at: new Date(Date.now() - 3600_000).toISOString(), amountMl: 33 }),
      });
      if (first.status !== 422) throw new Error(`expected the guard rail to ask for confirmation, got ${first.status}`);
      await post(`/api/reports/${draft.id}/entries`, {
        kind: "dose",
        at: new Date(Date.now() - 3600_000).toISOString(),
        amountMl: 33,
        confirm: true,
      });
      return draft.id as string;
    });
    await page.goto(`${baseUrl()}/reports/${id}`);
    const next = page.getByTestId("next-dose");
    await next.waitFor();
    // 33 mL × 30 mg/mL ÷ 40 L = 24.75 mg/L (3 % w/v = 30 mg/mL by definition of w/v).
    expect(await page.getByTestId("next-dose-ml").textContent()).toBe("33 mL");
    expect(await page.getByTestId("next-dose-concentration").textContent()).toBe("24.75 mg/L");
    expect(await next.textContent()).toMatch(/What to watch for/);
    expect(await page.getByTestId("entry-concentration").first().textContent()).toContain("24.75 mg/L");
    // The acknowledged warning stays on the entry, and the next dose (which repeats it) carries it too.
    expect(await page.getByTestId("entry-warning").first().locator("li").first().getAttribute("data-code")).toBe(
      "at_or_above_lowest_adverse",
    );
    expect(await page.getByTestId("next-dose-warnings").textContent()).toMatch(
      /already been lost or severely distressed/,
    );
    expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);

    await page.getByRole("button", { name: "Correct or strike out" }).click();
    const editor = page.getByRole("form", { name: "Correct this entry" });
    await editor.waitFor();
    expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);
    // Over 3× the planned dose and above the plausible ceiling: the form names both and asks for confirmation,
    // and the confirm button waits until the guard-rail warnings are ticked as read.
    await editor.getByLabel("mL of stock added").fill("330");
    await page.getByRole("button", { name: "Save the correction" }).click();
    const confirm = page.getByRole("button", { name: "Yes, it is right: save it" });
    await confirm.waitFor();
    expect(await editor.locator("p[role=alert]").textContent()).toMatch(/more than 3×/);
    expect(
      await editor
        .getByTestId("entry-rails")
        .locator("li")
        .evaluateAll((els) => els.map((e) => (e as HTMLElement).dataset.code)),
    ).toContain("above_ceiling");
    expect(await confirm.isDisabled()).toBe(true);
    expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);
    // 30 mL (22.5 mg/L) is still above the dose that went badly: acknowledged, then saved.
    await editor.getByLabel("mL of stock added").fill("30");
    await page.getByRole("button", { name: "Save the correction" }).click();
    await editor.getByTestId("entry-rails").locator("li[data-code=at_or_above_lowest_adverse]").waitFor();
    await editor.getByLabel("I have read these warnings").check();
    await confirm.click();
    await page.getByTestId("next-dose-ml").filter({ hasText: "30 mL" }).waitFor();
    await page.getByTestId("history").getByText("corrected a course entry").waitFor();
    expect(await page.getByTestId("history").textContent()).toContain(
      "warnings acknowledged: at or above the lowest dose that went badly",
    );

    await page.goto(`${baseUrl()}/`);
    await page.getByTestId("home-courses").getByRole("link").first().waitFor();
    expect(await page.getByTestId("home-courses").textContent()).toContain("30 mL");
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    await page.close();
  });

  it("logs a dose of dry salt in grams from the page at 390 px, with its g/L, and plans the next one in grams", async () => {
    const page = await browser().newPage({ viewport: { width: 390, height: 844 } });
    await signInAs(page, "member@example.org");
    // A salt course weighed dry (no stock named), planned at 1.5 g/L in 40 L, a dose every 24 h.
    const id = await page.evaluate(async () => {
      const r = await fetch("/api/reports/drafts", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({
          courseOpen: true,
          fishCount: 6,
          water: { volume: 40, volumeUnit: "L" },
          treatment: { agentSlug: "salt", statedConcentration: 1.5, intervalHours: 24 },
        }),
      });
      return ((await r.json()) as { id: string }).id;
    });
    await page.goto(`${baseUrl()}/reports/${id}`);
    // 1.5 g/L × 40 L = 60 g (mass concentration = mass ÷ volume, SI Brochure).
    await page.getByTestId("next-dose-ml").filter({ hasText: "60 g of dry salt" }).waitFor();
    const form = page.getByRole("form", { name: "Add to the course log" });
    expect(await form.getByLabel("grams of dry salt", { exact: true }).isChecked()).toBe(true);
    await form.getByLabel("Grams of dry salt added", { exact: true }).fill("60");
    await form.getByRole("button", { name: "Add to the log" }).click();
    await page.getByTestId("course-entries").getByText("dose of 60 g of dry salt").waitFor();
    expect(await page.getByTestId("entry-concentration").first().textContent()).toContain("1.5 g/L");
    expect(await page.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth)).toBe(true);
    await page.close();
  });
});
