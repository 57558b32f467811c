import { describe, expect, it } from "vitest";
import { baseUrl, useBrowser } from "./browser";

// A newcomer opens a group page on a phone over a slow mobile link: the risk chart must be in the first paint, not
// drawn by script seconds later. The profile is the "Slow 4G" preset of Chromium's DevTools (150 ms latency,
// ~1.6 Mbit/s down, 750 kbit/s up, 4× CPU slowdown: DevTools network presets, common practice, no published source).

const browser = useBrowser();
const GROUP_PAGE = "/evidence/livebearers?agent=hydrogen-peroxide";
const SLOW_4G = {
  offline: false,
  latency: 150,
  downloadThroughput: (1.6 * 1024 * 1024) / 8,
  uploadThroughput: (750 * 1024) / 8,
};

describe("a group page on a slow 4G phone", () => {
  it("has the risk chart's SVG in the server's HTML, with its BMD₁₀ marks and no chart script", async () => {
    const res = await fetch(`${baseUrl()}${GROUP_PAGE}`);
    // React separates adjacent text with empty comments; read the text without them.
    const html = (await res.text()).replaceAll("<!-- -->", "");
    console.log(`group page HTML: ${html.length} characters`);
    const chart = html.slice(html.indexOf('data-testid="risk-chart"'));
    expect(html).toContain('data-testid="risk-chart"');
    expect(chart.slice(0, 2000)).toMatch(/<svg[^>]*viewBox=/);
    expect(html).toContain("BMD₁₀");
    expect(html).toContain("BMDL₁₀");
    expect(html).toMatch(/about \d+ % of courses went badly, 95 % interval \d+ %?–\d+ %/);
    // Plot's own code never reaches the browser: no script chunk the page loads carries it.
    const scripts = [...html.matchAll(/<script[^>]+src="([^"]+)"/g)].map((m) => m[1]!);
    expect(scripts.length).toBeGreaterThan(0);
    for (const src of scripts) {
      const js = await (await fetch(new URL(src, baseUrl()))).text();
      expect(js, src).not.toMatch(/observablehq|plot-d6a7b5|dodgeY/);
    }
  });

  it("has the chart in the document by the first contentful paint", async () => {
    const context = await browser().newContext({
      viewport: { width: 390, height: 844 },
      deviceScaleFactor: 2,
      isMobile: true,
    });
    const page = await context.newPage();
    try {
      const cdp = await context.newCDPSession(page);
      await cdp.send("Network.enable");
      await cdp.send("Network.emulateNetworkConditions", SLOW_4G);
      await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
      // When the chart's SVG entered the document (parser-inserted nodes are observed too) and when the first
      // contentful paint happened, on the page's own clock.
      await page.addInitScript(() => {
        const t: { fcp: number | null; chart: number | null } = { fcp: null, chart: null };
        (window as unknown as { __paint: typeof t }).__paint = t;
        // Shown, not merely parsed: a drawing in a hidden (still streaming) part of the page does not count.
        new MutationObserver((_, observer) => {
          if (
            [...document.querySelectorAll('[data-testid="risk-chart"] svg')].some(
              (svg) => svg.getBoundingClientRect().width > 0,
            )
          ) {
            t.chart = performance.now();
            observer.disconnect();
          }
        }).observe(document, { childList: true, subtree: true });
        new PerformanceObserver((list) => {
          for (const e of list.getEntries()) if (e.name === "first-contentful-paint") t.fcp = e.startTime;
        }).observe({ type: "paint", buffered: true });
      });
      await page.goto(`${baseUrl()}${GROUP_PAGE}`, { waitUntil: "load", timeout: 60_000 });
      await page.waitForFunction(
        () => (window as unknown as { __paint: { fcp: number | null } }).__paint.fcp !== null,
        undefined,
        { timeout: 30_000 },
      );
      const t = await page.evaluate(
        () => (window as unknown as { __paint: { fcp: number; chart: number | null } }).__paint,
      );
      console.log(
        `slow 4G: first contentful paint at ${Math.round(t.fcp)} ms, risk chart in the document at ${t.chart === null ? "never" : `${Math.round(t.chart)} ms`}`,
      );
      expect(t.chart).not.toBeNull();
      // In the first paint: the chart was in the document by then (a frame's leeway for the observer's delivery).
      expect(t.chart!).toBeLessThanOrEqual(t.fcp + 50);
      const shown = page.locator('[data-testid="risk-chart"] svg').filter({ visible: true });
      expect((await shown.boundingBox())!.height).toBeGreaterThan(100);
    } finally {
      await context.close();
    }
  });

  it("shows the chart with JavaScript turned off", async () => {
    const context = await browser().newContext({ viewport: { width: 390, height: 844 }, javaScriptEnabled: false });
    const page = await context.newPage();
    try {
      await page.goto(`${baseUrl()}${GROUP_PAGE}`);
      const shown = page.locator('[data-testid="risk-chart"] svg').filter({ visible: true });
      expect(await shown.count()).toBe(1);
      const box = await shown.boundingBox();
      expect(box!.width).toBeGreaterThan(300);
      expect(box!.width).toBeLessThanOrEqual(390);
      expect(await shown.locator("text", { hasText: "BMDL₁₀" }).count()).toBe(1);
      expect(await page.getByTestId("risk-text").textContent()).toMatch(/of courses went badly/);
    } finally {
      await context.close();
    }
  });
});
