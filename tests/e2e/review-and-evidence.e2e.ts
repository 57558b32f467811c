import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { baseUrl, signInAs, useBrowser } from "./browser";

const browser = useBrowser();

async function api(page: Page, path: string, method: string, body?: unknown) {
  return page.evaluate(
    async ({ path, method, body }) => {
      const r = await fetch(path, {
        method,
        headers: body ? { "content-type": "application/json" } : {},
        body: body ? JSON.stringify(body) : undefined,
      });
      return { status: r.status, body: await r.json() };
    },
    { path, method, body },
  );
}

describe("review", () => {
  it("a moderator returns a report, the member fixes and resubmits it, and the moderator accepts it", async () => {
    const member = await browser().newPage();
    await signInAs(member, "member@example.org");
    const created = await api(member, "/api/reports", "POST", {
      speciesId: "betta-splendens",
      fishCount: 1,
      sizeClass: "adult",
      conditionSlug: "fin-rot",
      startedOn: "2026-11-15",
      water: { volume: 20, volumeUnit: "L", temperature: 26, temperatureUnit: "C", setting: "bare" },
      treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, amountMl: 10, doses: 1 },
      outcome: { fishLost: 0, lossCause: null, distress: "none", condition: "improved", observedDaysAfter: 7 },
      showName: true,
      submit: true,
    });
    expect(created.status).toBe(201);
    const id = created.body.id as string;

    const mod = await browser().newPage();
    await signInAs(mod, "moderator@example.org");
    await mod.goto(`${baseUrl()}/review`);
    await mod.getByRole("link", { name: /Review \(\d+\)/ }).waitFor();
    await mod.locator(`a[href="/review/${id}"]`).click();
    await mod.getByTestId("dose-context").waitFor();
    await mod.getByLabel("Return to the member for changes").check();
    await mod.getByLabel("What should the member fix?").fill("Please add the pH you measured.");
    await mod.getByRole("button", { name: "Record the decision" }).click();
    await mod.getByText("Decision saved").waitFor();

    await member.goto(`${baseUrl()}/reports/${id}`);
    expect(await member.getByTestId("moderator-note").textContent()).toContain("Please add the pH you measured.");
    await member.getByRole("link", { name: "Edit" }).click();
    await member.getByRole("button", { name: "2. Water" }).click();
    await member.getByLabel("pH (optional)").fill("7.2");
    await member.getByRole("button", { name: "Save and continue" }).click();
    await member.waitForURL(/step=2/);
    await member.goto(`${baseUrl()}/reports/${id}`);
    await member.getByRole("button", { name: "Resubmit for review" }).click();
    await member.waitForURL(/submitted=1/);

    await mod.goto(`${baseUrl()}/review/${id}`);
    await mod.getByLabel("Accept — it counts in the evidence").check();
    await mod.getByRole("button", { name: "Record the decision" }).click();
    await mod.getByText("Decision saved").waitFor();

    await member.goto(`${baseUrl()}/reports/${id}`);
    await member.getByText("Accepted").first().waitFor();
    const history = await member.getByTestId("history").textContent();
    expect(history).toMatch(/returned it for changes.*Please add the pH/);
    expect(history).toContain("resubmitted it");
    expect(history).toContain("accepted it");
    await mod.close();
    await member.close();
  });
});

describe("evidence", () => {
  it("lists groups, draws the chart, and the first-dose link lands in the planner prefilled", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/evidence?agent=hydrogen-peroxide`);
    await page.getByTestId("evidence-table").waitFor();
    expect(await page.getByText("Anecdotal evidence").first().isVisible()).toBe(true);
    await page.getByRole("link", { name: "Livebearers" }).click();
    // The dose charts are SVG images (loaded lazily, when scrolled to): each report a dot in the dose chart.
    for (const chart of ["dose-chart", "band-chart"]) {
      const img = page.getByTestId(chart).locator("img");
      await img.scrollIntoViewIfNeeded();
      await page.waitForFunction(
        (id) => (document.querySelector(`[data-testid="${id}"] img`) as HTMLImageElement | null)?.naturalWidth,
        chart,
      );
    }
    const doseSrc = await page
      .getByTestId("dose-chart")
      .locator("img")
      .evaluate((i: HTMLImageElement) => i.currentSrc);
    const doseSvg = await (await fetch(doseSrc)).text();
    expect(doseSvg.match(/<circle/g)?.length).toBeGreaterThan(3);
    expect(await page.getByTestId("chart-text").textContent()).toMatch(/tolerated doses from/);
    const median = Number((await page.getByTestId("median").textContent())!.replace(/[^\d.]/g, ""));
    // The page's first dose is the planner's (cautiousPlan): the bold figure, never at the lowest adverse dose.
    const planText = (await page.getByTestId("cautious-plan").textContent())!;
    const first = Number(
      (await page.getByTestId("cautious-plan").locator("strong").textContent())!.replace(/[^\d.]/g, ""),
    );
    const api = await (await fetch(`${baseUrl()}/api/summaries/livebearers?agent=hydrogen-peroxide`)).json();
    if (api.lowestAdverseDose != null) expect(first).toBeLessThan(api.lowestAdverseDose);
    await page.screenshot({ path: "tests/e2e/.artifacts/evidence-group.png", fullPage: true });
    await page.getByRole("link", { name: "Open the planner with this first dose" }).click();
    await page.waitForURL(/\/planner\?/);
    await page.getByText("Prefilled from the club's evidence for").waitFor();
    const target = Number(await page.getByLabel("Target concentration (mg/L)").inputValue());
    const fraction = Number(await page.getByLabel("First dose").inputValue());
    // The planner opens with that first dose: the full dose times its share.
    expect(target * fraction).toBeCloseTo(first, 1);
    if (fraction === 1) expect(planText).toContain("Later doses stay at it");
    else expect(target).toBeCloseTo(median, 0);
    await page.close();
  });
});
