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

describe("the moderator's decision", () => {
  for (const width of [1280, 390]) {
    it(`opens with no decision chosen, flags first, and needs an override note to accept a dose above the ceiling (${width} px)`, async () => {
      const member = await browser().newPage();
      await signInAs(member, "member@example.org");
      // 200 mL of 3 % w/v stock in 20 L is 300 mg/L: above the starter catalogue's plausible ceiling of 150 mg/L.
      const created = await api(member, "/api/reports", "POST", {
        speciesId: "betta-splendens",
        fishCount: 1,
        sizeClass: "adult",
        conditionSlug: "fin-rot",
        startedOn: "2026-11-15",
        water: { volume: 20, volumeUnit: "L", temperature: 26, temperatureUnit: "C", setting: "bare" },
        treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, amountMl: 200, doses: 1 },
        outcome: { fishLost: 0, lossCause: null, distress: "none", condition: "improved", observedDaysAfter: 7 },
        showName: true,
        submit: true,
      });
      expect(created.status).toBe(201);
      const id = created.body.id as string;

      const mod = await browser().newPage({ viewport: { width, height: 900 } });
      await signInAs(mod, "moderator@example.org");
      await mod.goto(`${baseUrl()}/review/${id}`);
      const flags = mod.getByTestId("review-flags");
      expect(await flags.textContent()).toMatch(/Above ceiling:.*300(\.0)? mg\/L.*plausible ceiling of 150 mg\/L/);
      // The flags come before the decision form on the page (both laid out first: boundingBox does not wait).
      await flags.waitFor();
      await mod.getByRole("form", { name: "Decision" }).waitFor();
      const [flagsY, formY] = await Promise.all([
        flags.boundingBox(),
        mod.getByRole("form", { name: "Decision" }).boundingBox(),
      ]);
      expect(flagsY!.y).toBeLessThan(formY!.y);
      const radios = mod.getByRole("radio");
      expect(await radios.count()).toBeGreaterThanOrEqual(3);
      for (const r of await radios.all()) expect(await r.isChecked()).toBe(false);

      await mod.getByLabel("Accept — it counts in the evidence").check();
      await mod.getByRole("button", { name: "Record the decision" }).click();
      expect(await mod.getByRole("alert").filter({ hasText: "override note" }).textContent()).toMatch(
        /at least 20 characters/,
      );
      await mod.getByLabel(/Override note/).fill("The member measured the stock twice; the dose is real.");
      await mod.getByRole("button", { name: "Record the decision" }).click();
      await mod.getByText("Decision saved").waitFor();
      await mod.reload();
      expect(await mod.getByTestId("history").textContent()).toContain("The member measured the stock twice");
      await member.close();
      await mod.close();
    });
  }
});

describe("the e-mail confirmation link", () => {
  for (const width of [1280, 390]) {
    it(`says an invalid link is invalid and what to do, never "confirmed" (${width} px)`, async () => {
      const page = await browser().newPage({ viewport: { width, height: 900 } });
      // The link as the sign-up sends it, with a token nobody issued.
      await page.goto(
        `${baseUrl()}/api/auth/verify-email?token=nonsense&callbackURL=${encodeURIComponent("/sign-in?verified=1")}`,
      );
      await page.waitForURL(/error=/);
      const outcome = page.getByTestId("verification-outcome");
      await outcome.waitFor();
      const text = (await outcome.textContent()) ?? "";
      expect(text).toMatch(/invalid/i);
      expect(text).toMatch(/fresh link/);
      expect(await page.locator("body").textContent()).not.toMatch(/Address confirmed|is confirmed/i);
      await page.close();
    });
  }

  it("says so too when a link sent at sign-in (which returns to the home page) fails", async () => {
    const page = await browser().newPage();
    await page.goto(`${baseUrl()}/api/auth/verify-email?token=nonsense&callbackURL=${encodeURIComponent("/")}`);
    await page.waitForURL(/\/sign-in\?error=/);
    const outcome = page.getByTestId("verification-outcome");
    await outcome.waitFor();
    expect((await outcome.textContent()) ?? "").toMatch(/invalid/i);
    await page.close();
  });
});
