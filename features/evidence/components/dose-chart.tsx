import * as Plot from "@observablehq/plot";
import { PlotImage, type ChartWidth } from "./server-plot";

export interface DoseChartProps {
  unit: string;
  points: { dose: number; tolerated: boolean; cleared: boolean }[];
  /** Counts per narrow dose bin, sent instead of points for large groups. */
  pointBins?: { from: number; to: number; reports: number; tolerated: number; cleared: number }[];
  p25: number | null;
  p75: number | null;
  median: number | null;
  medianInterval: { low: number; high: number } | null;
  lowestAdverse: number | null;
  bands: {
    from: number;
    to: number | null;
    reports: number;
    toleratedShare: { value: number | null; low: number | null; high: number | null };
  }[];
}

type Props = DoseChartProps;

/**
 * The two dose charts' drawings: each report at its dose (the interquartile range shaded, the median and its interval
 * drawn), and the share tolerated per dose band. `key` names everything they read.
 */
export function doseChartDrawings({
  unit,
  points,
  pointBins = [],
  p25,
  p75,
  median,
  medianInterval,
  lowestAdverse,
  bands,
}: Props) {
  const outcome = (d: Props["points"][number]) => (d.tolerated ? "Tolerated" : "Adverse");
  // Everything the drawings read: the same figures reuse the same drawings (server-plot.tsx).
  const key = JSON.stringify([unit, points, pointBins, p25, p75, median, medianInterval, lowestAdverse, bands]);
  // Large groups come as bins: one bar per bin and outcome, its height the count of reports.
  const binned =
    points.length === 0
      ? pointBins
          .flatMap((b) => [
            { from: b.from, to: b.to, n: b.tolerated, outcome: "Tolerated" },
            { from: b.from, to: b.to, n: b.reports - b.tolerated, outcome: "Adverse" },
          ])
          .filter((b) => b.n > 0)
      : [];
  const withData = bands.filter((b) => b.reports > 0);
  const dots = (width: number): Plot.PlotOptions => ({
    width,
    height: 220,
    marginLeft: 90,
    style: { fontSize: "12px" },
    x: { label: `Peak dose (${unit})`, grid: true },
    y: { axis: null },
    color: { domain: ["Tolerated", "Adverse"], range: ["#2f7a63", "#b3261e"] },
    marks: [
      p25 !== null && p75 !== null
        ? Plot.rectX([{ x1: p25, x2: p75 }], { x1: "x1", x2: "x2", fill: "#d5e7df", fillOpacity: 0.8 })
        : null,
      medianInterval
        ? Plot.rectX([{ ...medianInterval, facet: "Tolerated" }], {
            x1: "low",
            x2: "high",
            fy: "facet",
            fill: "none",
            stroke: "#1d5444",
            strokeDasharray: "4,3",
          })
        : null,
      median !== null ? Plot.ruleX([median], { stroke: "#0f2e26", strokeWidth: 2 }) : null,
      lowestAdverse !== null ? Plot.ruleX([lowestAdverse], { stroke: "#b3261e", strokeDasharray: "2,2" }) : null,
      binned.length
        ? Plot.rectY(binned, {
            x1: "from",
            x2: "to",
            y1: 0,
            y2: "n",
            fy: "outcome",
            fill: "outcome",
            fillOpacity: 0.75,
          })
        : null,
      Plot.dot(
        points,
        Plot.dodgeY({
          x: "dose",
          fy: outcome,
          fill: outcome,
          r: 3.5,
          fillOpacity: 0.75,
          anchor: "middle",
        }),
      ),
    ],
    fy: { label: null, domain: ["Tolerated", "Adverse"], axis: "left" },
  });
  const shares = (width: number): Plot.PlotOptions => ({
    width,
    height: 220,
    marginLeft: 50,
    style: { fontSize: "12px" },
    x: {
      label: `Dose band (${unit})`,
      domain: withData.map((b) => `${b.from}–${b.to ?? "+"}`),
      tickRotate: width < 480 && withData.length > 5 ? -40 : 0,
    },
    marginBottom: width < 480 && withData.length > 5 ? 56 : 30,
    y: { label: "Share tolerated", domain: [0, 1], tickFormat: "%", grid: true },
    marks: [
      Plot.ruleX(withData, {
        x: (b) => `${b.from}–${b.to ?? "+"}`,
        y1: (b) => b.toleratedShare.low,
        y2: (b) => b.toleratedShare.high,
        stroke: "#1d5444",
      }),
      Plot.dot(withData, {
        x: (b) => `${b.from}–${b.to ?? "+"}`,
        y: (b) => b.toleratedShare.value,
        fill: "#1d5444",
        r: 4,
      }),
    ],
  });
  return { key, dose: dots, band: shares };
}

/**
 * Both dose charts, served as images (they sit below the first screen; inline they would weigh on every page load
 * twice, in the HTML and in React's payload). `src` gives a chart's address at a drawing width.
 */
export function DoseChart({
  points,
  pointBins = [],
  src,
  doseAlt,
  bandAlt,
}: Pick<Props, "points" | "pointBins"> & {
  src: (kind: "dose" | "band", width: ChartWidth) => string;
  doseAlt: string;
  bandAlt: string;
}) {
  return (
    <div className="grid gap-4">
      <figure className="grid gap-1">
        <PlotImage testId="dose-chart" src={(w) => src("dose", w)} height={() => 220} alt={doseAlt} />
        <figcaption className="text-sm text-peat-700">
          {points.length || !pointBins.length
            ? "Each dot is one accepted report at its peak dose."
            : "Each bar counts the accepted reports in a narrow dose band (too many reports for a dot each)."}{" "}
          Shaded: the middle half of tolerated doses; solid line: their median; dashed box: the median&apos;s interval;
          red dashed line: the lowest dose that went badly.
        </figcaption>
      </figure>
      <figure className="grid gap-1">
        <PlotImage testId="band-chart" src={(w) => src("band", w)} height={() => 220} alt={bandAlt} />
        <figcaption className="text-sm text-peat-700">
          Share of reports tolerated in each dose band, with its Wilson interval. The band table below gives the same
          figures as text.
        </figcaption>
      </figure>
    </div>
  );
}
