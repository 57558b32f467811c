import { describe, expect, it } from "vitest";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

describe("the course log on a phone", () => {
  it("shows the next dose and the correction form at 390 px without sideways scroll, and the course on the member's home", async () => {
    const page = await browser().newPage({ viewport: { width: 390, height: 844 } });
    await signInAs(page, "member@example.org");
    // An open course with one dose, made through the API from the page (same origin, the member's session).
    const id = await page.evaluate(async () => {
      const post = (url: string, body: unknown) => fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) }).then((r) => r.json());
      const draft = await post("/api/reports/drafts", {
        courseOpen: true, speciesId: "paracheirodon-innesi", fishCount: 6, water: { volume: 40, volumeUnit: "L" },
        treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, stockBasis: "w/v", statedConcentration: 25, intervalHours: 48 },
      });
      await post(`/api/reports/${draft.id}/entries`, { kind: "dose", at: new Date(Date.now() - 3600_000).toISOString(), amountMl: 33 });
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
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);

    await page.getByRole("button", { name: "Correct or strike out" }).click();
    await page.getByRole("form", { name: "Correct this entry" }).waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    // Over 3× the planned dose: the form asks for confirmation before saving.
    await page.getByRole("form", { name: "Correct this entry" }).getByLabel("mL of stock added").fill("330");
    await page.getByRole("button", { name: "Save the correction" }).click();
    await page.getByRole("button", { name: "Yes, it is right: save it" }).waitFor();
    expect(await page.getByRole("alert").first().textContent()).toMatch(/more than 3×/);
    await page.getByRole("form", { name: "Correct this entry" }).getByLabel("mL of stock added").fill("30");
    await page.getByRole("button", { name: "Save the correction" }).click();
    await page.getByTestId("next-dose-ml").filter({ hasText: "30 mL" }).waitFor();
    await page.getByTestId("history").getByText("corrected a course entry").waitFor();

    await page.goto(`${baseUrl()}/`);
    await page.getByTestId("home-courses").getByRole("link").first().waitFor();
    expect(await page.getByTestId("home-courses").textContent()).toContain("30 mL");
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    await page.close();
  });
});
