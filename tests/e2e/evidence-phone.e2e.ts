import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { baseUrl, useBrowser } from "./browser";

// The evidence pages are what newcomers open on a phone: at 390 px (and at 1280 px) the page itself never scrolls
// sideways, wide tables turn into cards, and chart text is drawn at 11 px or more (not a 640 px chart scaled down),
// whether the chart is inline SVG or an SVG image.

const browser = useBrowser();

const pages = [
  {
    name: "the evidence index",
    path: "/evidence?agent=hydrogen-peroxide",
    table: "evidence-table",
    charts: [["groups-chart", "groups-chart-image"]],
  },
  {
    name: "a group page",
    path: "/evidence/livebearers?agent=hydrogen-peroxide",
    table: "band-table",
    // The risk chart: inline on a phone, an image on wider screens; one of the two is on screen.
    charts: [["dose-chart"], ["band-chart"], ["risk-chart", "risk-chart-image"]],
  },
];

/**
 * The smallest on-screen font size of a chart's text: its CSS size times how far the SVG is scaled. A chart shown
 * as an image is measured from its SVG document, laid out at the image's on-screen width.
 */
async function smallestChartText(page: Page, testIds: string[]): Promise<number> {
  const sizes: number[] = [];
  for (const testId of testIds) {
    const root = page.getByTestId(testId);
    if (!(await root.count())) continue;
    const img = root.locator("img").filter({ visible: true });
    if (await img.count()) {
      // Lazy: scrolled to, it loads its drawing.
      await img.scrollIntoViewIfNeeded();
      await img.evaluate((el: HTMLImageElement) =>
        el.complete && el.naturalWidth ? null : new Promise((done) => el.addEventListener("load", done)),
      );
    }
    sizes.push(
      ...(await root.evaluate(async (el) => {
        const measure = (svg: SVGSVGElement, width: number) => {
          const box = svg.viewBox.baseVal;
          const scale = box && box.width ? width / box.width : 1;
          return [...svg.querySelectorAll("text")]
            .filter((t) => (t.textContent ?? "").trim())
            .map((t) => parseFloat(getComputedStyle(t).fontSize) * scale);
        };
        // Each chart is drawn at several widths and CSS or <picture> shows one: measure the one on screen.
        const found = [...el.querySelectorAll("svg")]
          .filter((svg) => svg.getBoundingClientRect().width > 0)
          .flatMap((svg) => measure(svg, svg.getBoundingClientRect().width));
        for (const img of el.querySelectorAll("img")) {
          const width = img.getBoundingClientRect().width;
          if (!width) continue;
          const holder = document.createElement("div");
          holder.style.cssText = `position:absolute;left:0;top:0;width:${width}px;visibility:hidden`;
          holder.innerHTML = await (await fetch(img.currentSrc)).text();
          document.body.append(holder);
          found.push(...measure(holder.querySelector("svg")!, width));
          holder.remove();
        }
        return found;
      })),
    );
  }
  return sizes.length ? Math.min(...sizes) : Number.NaN;
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
          // Inline charts come drawn in the server's HTML; images are waited for when measured.
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
            expect(smallest, `${chart.join(" or ")} text at ${width} px`).toBeGreaterThanOrEqual(11);
          }
        } finally {
          await context.close();
        }
      });
    }
  }
});
