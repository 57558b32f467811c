import * as Plot from "@observablehq/plot";
import { PlotImage, ServerPlot, type ChartWidth } from "./server-plot";

export interface GroupRow {
  name: string;
  p10: number;
  p90: number;
  median: number;
  bmdl: number | null;
}

export const groupsChartHeight = (rows: number) => 40 + 30 * rows;

/** Every drawn dose (ranges, medians, BMDLs) with a little room on a log axis. */
function xDomain(rows: GroupRow[]): [number, number] {
  const xs = rows.flatMap((r) => [r.p10, r.p90, r.median, ...(r.bmdl !== null && r.bmdl > 0 ? [r.bmdl] : [])]);
  return [Math.min(...xs) / 1.15, Math.max(...xs) * 1.15];
}

/**
 * One line per group on a shared log dose axis, to compare groups at a glance: the tolerated range (10th to 90th
 * percentile), the median tolerated dose as a dot and the BMDL₁₀ as a red tick. `key` names everything it reads.
 */
export function groupsChartDrawing(unit: string, rows: GroupRow[]) {
  return {
    key: JSON.stringify([unit, rows]),
    build: (width: number): Plot.PlotOptions => {
      // Group names take up to 40 % of the width (280 px at most: the longest name whole at 960 px), cut with an
      // ellipsis beyond it. Plot measures the cut in ems of the 12 px text.
      const marginLeft = Math.min(280, Math.round(width * 0.4));
      return {
        width,
        height: groupsChartHeight(rows.length),
        marginLeft,
        style: { fontSize: "12px" },
        // Bounds with room on both sides, so a BMDL tick below the lowest range sits on the axis, not on the names.
        x: {
          type: "log",
          label: `Dose (${unit}, log scale)`,
          grid: true,
          domain: xDomain(rows),
          ticks: width < 500 ? 4 : 8,
        },
        y: { domain: rows.map((r) => r.name), label: null },
        marks: [
          // Plot estimates text widths; the shipped sans runs wider, hence the margin of safety.
          Plot.axisY({ textOverflow: "ellipsis", lineWidth: (marginLeft - 16) / 13.5, tickSize: 0 }),
          Plot.ruleY(rows, {
            y: "name",
            x1: "p10",
            x2: "p90",
            stroke: "#2f7a63",
            strokeWidth: 6,
            strokeOpacity: 0.45,
          }),
          Plot.dot(rows, { y: "name", x: "median", fill: "#0f2e26", r: 4 }),
          Plot.tickX(
            rows.filter((r) => r.bmdl !== null && r.bmdl > 0),
            { y: "name", x: "bmdl", stroke: "#b3261e", strokeWidth: 2 },
          ),
        ],
      };
    },
  };
}

/**
 * The groups compared: inline SVG at a phone's width (in the first paint), an image on wider screens (the page stays
 * light: an inline drawing is sent twice, in the HTML and in React's payload). `src` gives the image's address.
 */
export function GroupsChart({
  unit,
  rows,
  src,
  alt,
}: {
  unit: string;
  rows: GroupRow[];
  src: (width: ChartWidth) => string;
  alt: string;
}) {
  const { key, build } = groupsChartDrawing(unit, rows);
  return (
    <>
      <ServerPlot testId="groups-chart" cacheKey={key} build={build} widths={[330]} />
      <PlotImage
        testId="groups-chart-image"
        src={src}
        height={() => groupsChartHeight(rows.length)}
        alt={alt}
        widths={[580, 960]}
        className="max-sm:hidden"
      />
    </>
  );
}
