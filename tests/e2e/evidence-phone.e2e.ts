import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { baseUrl, useBrowser } from "./browser";

// The evidence pages are what newcomers open on a phone: at 390 px (and at 1280 px) the page itself never scrolls
// sideways, wide tables turn into cards, and chart text is drawn at 11 px or more (not a 640 px chart scaled down).

const browser = useBrowser();

const pages = [
  {
    name: "the evidence index",
    path: "/evidence?agent=hydrogen-peroxide",
    table: "evidence-table",
    charts: ["groups-chart"],
  },
  {
    name: "a group page",
    path: "/evidence/livebearers?agent=hydrogen-peroxide",
    table: "band-table",
    charts: ["dose-chart", "band-chart", "risk-chart"],
  },
];

/** The smallest on-screen font size of the chart's text: its CSS size times how far the SVG is scaled. */
async function smallestChartText(page: Page, testId: string): Promise<number> {
  return page.getByTestId(testId).evaluate((root) => {
    // Each chart is drawn at three widths and CSS shows one: measure the one on screen.
    const sizes = [...root.querySelectorAll("svg")]
      .filter((svg) => svg.getBoundingClientRect().width > 0)
      .flatMap((svg) => {
        const box = svg.viewBox.baseVal;
        const scale = box && box.width ? svg.getBoundingClientRect().width / box.width : 1;
        return [...svg.querySelectorAll("text")]
          .filter((t) => (t.textContent ?? "").trim())
          .map((t) => parseFloat(getComputedStyle(t).fontSize) * scale);
      });
    return sizes.length ? Math.min(...sizes) : Number.NaN;
  });
}

describe("evidence pages on a phone and a desktop", () => {
  for (const width of [390, 1280]) {
    for (const p of pages) {
      it(`${p.name} has no sideways scroll at ${width} px`, async () => {
        const context = await browser().newContext({ viewport: { width, height: 844 } });
        const page = await context.newPage();
        try {
          await page.goto(`${baseUrl()}${p.path}`);
          await page.getByTestId(p.table).waitFor();
          // The charts come drawn in the server's HTML: nothing to wait for.
          const { scrollWidth, clientWidth } = await page.evaluate(() => ({
            scrollWidth: document.documentElement.scrollWidth,
            clientWidth: document.documentElement.clientWidth,
          }));
          expect(scrollWidth, `${p.path} at ${width} px`).toBeLessThanOrEqual(clientWidth);
          // On a phone the table's header row is hidden and each cell names its column (stacked cards).
          const headerShown = await page.getByTestId(p.table).locator("thead").isVisible();
          expect(headerShown).toBe(width >= 640);
          for (const chart of p.charts) {
            const smallest = await smallestChartText(page, chart);
            expect(smallest, `${chart} text at ${width} px`).toBeGreaterThanOrEqual(11);
          }
        } finally {
          await context.close();
        }
      });
    }
  }
});
