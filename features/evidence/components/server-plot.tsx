import "server-only";
import * as Plot from "@observablehq/plot";
import { parseHTML } from "linkedom";

/**
 * The widths each chart is drawn at, and the viewports that show each drawing. One drawing scaled to every screen
 * would shrink its text below legibility on a phone or blow it up on a desktop; three drawings, each shown only where
 * its box is about as wide as it was drawn (never narrower than drawn at 390 px and up), keep chart text at 12 px or
 * a little more. The page's content box is the viewport less 32 px (up to 1120 px); a figure's padding takes ~26 px.
 * `media` matches Tailwind's `sm` (40rem) and `lg` (64rem) breakpoints, which the inline drawings switch on.
 */
export const DRAWINGS = [
  { width: 330, media: null },
  { width: 580, media: "(min-width: 40rem)" },
  { width: 960, media: "(min-width: 64rem)" },
] as const;
export const CHART_WIDTHS = DRAWINGS.map((d) => d.width);
export type ChartWidth = (typeof DRAWINGS)[number]["width"];

/** Attributes holding coordinates: a tenth of a pixel is finer than any screen shows at these sizes. */
const COORDINATES = /\s(d|x|y|x1|x2|y1|y2|cx|cy|r|width|height|transform)="([^"]*)"/g;
const round = (v: string) => v.replace(/-?\d*\.\d+(?!\d*em)/g, (n) => String(Math.round(Number(n) * 10) / 10));

/**
 * Plot's markup, made small enough to send: coordinates to a tenth of a pixel; runs of plain bars (one `<rect>` each)
 * and of lines and axis ticks merged into one path each; no per-mark tooltips, labels for assistive technology or stylesheet, which these charts do
 * not use (every chart is hidden from assistive technology or an image with its own alt text, its figures in the
 * text and tables beside it).
 */
export function compactSvg(svg: string): string {
  return (
    svg
      .replace(/<title>[^<]*<\/title>/g, "")
      .replace(/<style>[\s\S]*?<\/style>/g, "")
      .replace(/ class="plot-[^"]*"/g, "")
      .replace(/ aria-(label|hidden|description)="[^"]*"/g, "")
      .replace(COORDINATES, (_, name: string, value: string) => ` ${name}="${round(value)}"`)
      .replace(/(?:<rect(?: (?:x|y|width|height)="[^"]*")+\s*(?:\/>|><\/rect>))+/g, (run) => {
        let d = "";
        for (const [rect] of run.matchAll(/<rect[^>]*>/g)) {
          const a = Object.fromEntries([...rect.matchAll(/(x|y|width|height)="([^"]*)"/g)].map((m) => [m[1], m[2]]));
          d += `M${a.x ?? 0} ${a.y ?? 0}h${a.width}v${a.height}h-${a.width}z`;
        }
        return `<path d="${d}"/>`;
      })
      .replace(/(?:<line(?: (?:x1|x2|y1|y2)="[^"]*")+\s*(?:\/>|><\/line>))+/g, (run) => {
        let d = "";
        for (const [line] of run.matchAll(/<line[^>]*>/g)) {
          const a = Object.fromEntries([...line.matchAll(/(x1|x2|y1|y2)="([^"]*)"/g)].map((m) => [m[1], m[2]]));
          const [x1, y1, x2, y2] = [a.x1 ?? "0", a.y1 ?? "0", a.x2 ?? "0", a.y2 ?? "0"];
          d += `M${x1} ${y1}${x1 === x2 ? `V${y2}` : y1 === y2 ? `H${x2}` : `L${x2} ${y2}`}`;
        }
        return `<path d="${d}"/>`;
      })
      // Axis ticks: each a short path moved into place; one path drawing them all.
      .replace(
        /(?:<path d="M0,0L-?[\d.]+,-?[\d.]+" transform="translate\(-?[\d.]+,-?[\d.]+\)"\s*(?:\/>|><\/path>))+/g,
        (run) => {
          let d = "";
          for (const m of run.matchAll(
            /d="M0,0L(-?[\d.]+),(-?[\d.]+)" transform="translate\((-?[\d.]+),(-?[\d.]+)\)"/g,
          )) {
            d += `M${m[3]} ${m[4]}${m[1] === "0" ? `v${m[2]}` : m[2] === "0" ? `h${m[1]}` : `l${m[1]} ${m[2]}`}`;
          }
          return `<path d="${d}"/>`;
        },
      )
  );
}

/** One Plot chart drawn on the server into compact SVG markup, with a DOM that lives only for this drawing. */
function drawSvg(options: Plot.PlotOptions): string {
  const { document } = parseHTML("<!doctype html><html><body></body></html>");
  const chart = Plot.plot({ ...options, document: document as unknown as Document });
  // Fill the box it is shown in (the viewBox keeps the proportions). A system font: a drawing shown as an image
  // cannot reach the page's web fonts, and inline drawings then look the same.
  chart.setAttribute("style", `${chart.getAttribute("style") ?? ""};display:block;width:100%;height:auto`);
  chart.setAttribute("font-family", "system-ui, sans-serif");
  return compactSvg(chart.outerHTML);
}

/**
 * Drawings already made, by chart, width and everything the drawing depends on (content-addressed: changed figures
 * are a new key, so nothing goes stale). Drawing a page's charts costs tens of milliseconds; a page or image shown
 * again with the same figures reuses them. Least recently used first out, bounded.
 */
const drawn = new Map<string, string>();
const MAX_DRAWN = 256;

export function drawChart(key: string | undefined, width: number, build: (width: number) => Plot.PlotOptions) {
  if (key === undefined) return drawSvg(build(width));
  const k = `${width}\u0000${key}`;
  const hit = drawn.get(k);
  if (hit !== undefined) {
    drawn.delete(k);
    drawn.set(k, hit);
    return hit;
  }
  const svg = drawSvg(build(width));
  drawn.set(k, svg);
  if (drawn.size > MAX_DRAWN) drawn.delete(drawn.keys().next().value!);
  return svg;
}

/** A short fingerprint of a chart's figures, for image addresses that change when the figures do. */
export function chartVersion(key: string): string {
  // Two 32-bit FNV-1a-style hashes with different seeds: not cryptographic, only to tell figures apart.
  let h1 = 0x811c9dc5;
  let h2 = 0x9747b28c;
  for (let i = 0; i < key.length; i++) {
    const c = key.charCodeAt(i);
    h1 = Math.imul(h1 ^ c, 0x01000193);
    h2 = Math.imul(h2 ^ c, 0x5bd1e995);
  }
  return (h1 >>> 0).toString(36) + (h2 >>> 0).toString(36);
}

/**
 * A chart as server-rendered SVG: in the first HTML, readable before (and without) any script, and no chart library
 * in the page's JavaScript. `build` gives the Plot options for a drawing width. The chart is hidden from assistive
 * technology: every chart on these pages has its text equivalent beside it. `cacheKey`, when given, must name
 * everything `build` reads (the chart's props, serialised): the drawings are then reused while it stays the same.
 * `widths` limits the drawings sent inline (each is sent twice: in the HTML and in React's payload), e.g. to the
 * phone's, with the wider ones shown as images (PlotImage).
 */
export function ServerPlot({
  testId,
  build,
  cacheKey,
  widths = CHART_WIDTHS,
}: {
  testId: string;
  build: (width: number) => Plot.PlotOptions;
  cacheKey?: string;
  widths?: readonly ChartWidth[];
}) {
  const key = cacheKey === undefined ? undefined : `${testId}\u0000${cacheKey}`;
  const shown = DRAWINGS.filter((d) => widths.includes(d.width));
  return (
    <div data-testid={testId} aria-hidden="true" className="min-w-0">
      {shown.map((d, i) => (
        <div
          key={d.width}
          className={showClass(d.width, (shown[i + 1] ?? DRAWINGS[DRAWINGS.indexOf(d) + 1])?.width)}
          dangerouslySetInnerHTML={{ __html: drawChart(key, d.width, build) }}
        />
      ))}
    </div>
  );
}

/** The classes that show a drawing from its own breakpoint up to the next drawing's (sent inline or not). */
function showClass(width: ChartWidth, next: ChartWidth | undefined): string {
  const from = width === 330 ? "block" : width === 580 ? "max-sm:hidden" : "max-lg:hidden";
  const to = next === undefined ? "" : next === 580 ? " sm:hidden" : " lg:hidden";
  return `${from}${to}`;
}

/**
 * A chart served as an SVG image (see the evidence chart route): one `<source>` per drawing width so each screen
 * loads the drawing it shows at about its drawn size, lazily, so a drawing in a hidden box or far below is never
 * fetched first. `src` gives a width's address and `height` its drawn height (the box keeps its place while loading).
 */
export function PlotImage({
  testId,
  src,
  height,
  alt,
  widths = CHART_WIDTHS,
  className,
}: {
  testId: string;
  src: (width: ChartWidth) => string;
  height: (width: ChartWidth) => number;
  alt: string;
  widths?: readonly ChartWidth[];
  className?: string;
}) {
  const shown = DRAWINGS.filter((d) => widths.includes(d.width));
  const [fallback, ...wider] = shown;
  return (
    <picture data-testid={testId} className={className ? `block min-w-0 ${className}` : "block min-w-0"}>
      {wider.reverse().map((d) => (
        <source key={d.width} media={d.media!} srcSet={src(d.width)} width={d.width} height={height(d.width)} />
      ))}
      <img
        src={src(fallback!.width)}
        width={fallback!.width}
        height={height(fallback!.width)}
        alt={alt}
        loading="lazy"
        decoding="async"
        className="block h-auto w-full"
      />
    </picture>
  );
}
