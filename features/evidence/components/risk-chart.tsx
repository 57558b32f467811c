import * as Plot from "@observablehq/plot";
import { PlotImage, ServerPlot, type ChartWidth } from "./server-plot";
import type { CurvePoint } from "../dose-response";

export interface RiskChartProps {
  unit: string;
  level: number;
  curve: CurvePoint[];
  bmd: number;
  bmdl: number;
  points: { dose: number; tolerated: boolean }[];
  /** Counts per narrow dose bin, sent instead of points for large groups. */
  pointBins?: { from: number; to: number; reports: number; tolerated: number }[];
}

type Props = RiskChartProps;

export const riskChartHeight = (width: number) => (width < 480 ? 240 : 260);

/**
 * The fitted chance that a course goes badly, with its band, over log dose; BMD₁₀ and BMDL₁₀ marked; each report
 * beneath. `key` names everything the drawing reads.
 */
export function riskChartDrawing({ unit, level, curve, bmd, bmdl, points, pointBins = [] }: Props) {
  // Large groups come as bins: bars hanging from the top (went badly) and standing on the bottom (went well),
  // up to a tenth of the height for the fullest bin.
  const bins = points.length === 0 ? pointBins.filter((b) => b.from > 0) : [];
  const most = Math.max(1, ...bins.map((b) => Math.max(b.tolerated, b.reports - b.tolerated)));
  const tall = (n: number) => (0.1 * n) / most;
  return {
    key: JSON.stringify([unit, level, curve, bmd, bmdl, points, pointBins]),
    build: (width: number): Plot.PlotOptions => ({
      width,
      height: riskChartHeight(width),
      marginLeft: 50,
      style: { fontSize: "12px" },
      x: { type: "log", label: `Peak dose (${unit}, log scale)`, grid: true },
      y: { label: "Chance the course goes badly", domain: [0, 1], tickFormat: "%", grid: true },
      marks: [
        Plot.areaY(curve, { x: "dose", y1: "low", y2: "high", fill: "#b3261e", fillOpacity: 0.15 }),
        Plot.lineY(curve, { x: "dose", y: "risk", stroke: "#b3261e", strokeWidth: 2 }),
        // The reports themselves: went badly along the top, went well along the bottom.
        Plot.dot(
          points.filter((p) => p.dose > 0),
          {
            x: "dose",
            y: (p: Props["points"][number]) => (p.tolerated ? 0 : 1),
            fill: (p: Props["points"][number]) => (p.tolerated ? "#2f7a63" : "#b3261e"),
            fillOpacity: 0.5,
            r: 3,
          },
        ),
        Plot.rect(
          bins.filter((b) => b.tolerated > 0),
          {
            x1: "from",
            x2: "to",
            y1: 0,
            y2: (b: (typeof bins)[number]) => tall(b.tolerated),
            fill: "#2f7a63",
            fillOpacity: 0.5,
          },
        ),
        Plot.rect(
          bins.filter((b) => b.reports > b.tolerated),
          {
            x1: "from",
            x2: "to",
            y1: (b: (typeof bins)[number]) => 1 - tall(b.reports - b.tolerated),
            y2: 1,
            fill: "#b3261e",
            fillOpacity: 0.5,
          },
        ),
        Plot.ruleX([bmdl], { stroke: "#0f2e26", strokeDasharray: "4,3" }),
        Plot.ruleX([bmd], { stroke: "#0f2e26" }),
        Plot.text(
          [
            { x: bmd, label: "BMD₁₀" },
            { x: bmdl, label: "BMDL₁₀" },
          ],
          { x: "x", y: 0.92, text: "label", dx: 4, textAnchor: "start", fill: "#0f2e26" },
        ),
        Plot.ruleY([0.1], { stroke: "#0f2e26", strokeOpacity: 0.4 }),
      ],
    }),
  };
}

/**
 * The risk chart: inline SVG at a phone's width, so it is in the first paint on a slow phone (and without script);
 * wider screens load their drawing as an image, keeping the page light. `src` gives the image's address at a width.
 */
export function RiskChart({ src, alt, ...props }: Props & { src: (width: ChartWidth) => string; alt: string }) {
  const { key, build } = riskChartDrawing(props);
  return (
    <>
      <ServerPlot testId="risk-chart" cacheKey={key} build={build} widths={[330]} />
      <PlotImage
        testId="risk-chart-image"
        src={src}
        height={riskChartHeight}
        alt={alt}
        widths={[580, 960]}
        className="max-sm:hidden"
      />
    </>
  );
}
