import "server-only";
import * as Plot from "@observablehq/plot";
import { parseHTML } from "linkedom";

/**
 * The widths each chart is drawn at, and the viewports that show each drawing. One drawing scaled to every screen
 * would shrink its text below legibility on a phone or blow it up on a desktop; three drawings, each shown only where
 * its box is about as wide as it was drawn (never narrower than drawn at 390 px and up), keep chart text at 12 px or
 * a little more. The page's content box is the viewport less 32 px (up to 1120 px); a figure's padding takes ~26 px.
 */
const DRAWINGS = [
  { width: 330, show: "block sm:hidden" },
  { width: 580, show: "hidden sm:block lg:hidden" },
  { width: 960, show: "hidden lg:block" },
] as const;

/** One Plot chart drawn on the server into SVG markup, with a DOM that lives only for this drawing. */
function drawSvg(options: Plot.PlotOptions): string {
  const { document } = parseHTML("<!doctype html><html><body></body></html>");
  const chart = Plot.plot({ ...options, document: document as unknown as Document });
  // Fill the box it is shown in (the viewBox keeps the proportions); Plot's own style caps it at its drawn width.
  chart.setAttribute("style", `${chart.getAttribute("style") ?? ""};width:100%;height:auto;max-width:none`);
  // Coordinates to a hundredth of a pixel: Plot writes up to 17 digits, a third of the markup for nothing on screen.
  return chart.outerHTML.replace(/(\d\.\d\d)\d+/g, "$1");
}

/**
 * Drawings already made, by chart and everything its drawing depends on (content-addressed: changed figures are a new
 * key, so nothing goes stale). Drawing a page's charts costs tens of milliseconds per request; a page shown again with
 * the same figures reuses them. Least recently used first out, bounded.
 */
const drawn = new Map<string, string[]>();
const MAX_DRAWN = 96;

function drawingsOf(key: string | undefined, build: (width: number) => Plot.PlotOptions): string[] {
  if (key === undefined) return DRAWINGS.map((d) => drawSvg(build(d.width)));
  const hit = drawn.get(key);
  if (hit) {
    drawn.delete(key);
    drawn.set(key, hit);
    return hit;
  }
  const svgs = DRAWINGS.map((d) => drawSvg(build(d.width)));
  drawn.set(key, svgs);
  if (drawn.size > MAX_DRAWN) drawn.delete(drawn.keys().next().value!);
  return svgs;
}

/**
 * A chart as server-rendered SVG: in the first HTML, readable before (and without) any script, and no chart library
 * in the page's JavaScript. `build` gives the Plot options for a drawing width. The chart is hidden from assistive
 * technology: every chart on these pages has its text equivalent beside it. `cacheKey`, when given, must name
 * everything `build` reads (the chart's props, serialised): the drawings are then reused while it stays the same.
 */
export function ServerPlot({
  testId,
  build,
  cacheKey,
}: {
  testId: string;
  build: (width: number) => Plot.PlotOptions;
  cacheKey?: string;
}) {
  const svgs = drawingsOf(cacheKey === undefined ? undefined : `${testId}\u0000${cacheKey}`, build);
  return (
    <div data-testid={testId} aria-hidden="true" className="min-w-0">
      {DRAWINGS.map((d, i) => (
        <div key={d.width} className={d.show} dangerouslySetInnerHTML={{ __html: svgs[i]! }} />
      ))}
    </div>
  );
}
