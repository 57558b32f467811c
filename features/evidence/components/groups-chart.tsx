import * as Plot from "@observablehq/plot";
import { ServerPlot } from "./server-plot";

export interface GroupRow {
  name: string;
  p10: number;
  p90: number;
  median: number;
  bmdl: number | null;
}

/**
 * One line per group on a shared log dose axis, to compare groups at a glance: the tolerated range (10th to 90th
 * percentile), the median tolerated dose as a dot and the BMDL₁₀ as a red tick. The table beside it says the same in text.
 * Drawn on the server (see server-plot.tsx).
 */
export function GroupsChart({ unit, rows }: { unit: string; rows: GroupRow[] }) {
  return (
    <ServerPlot
      testId="groups-chart"
      cacheKey={JSON.stringify([unit, rows])}
      build={(width) => {
        // Group names take up to 40 % of a phone's width, cut with an ellipsis beyond it.
        const marginLeft = Math.min(170, Math.round(width * 0.4));
        return {
          width,
          height: 40 + 30 * rows.length,
          marginLeft,
          style: { fontSize: "12px" },
          x: { type: "log", label: `Dose (${unit}, log scale)`, grid: true },
          y: { domain: rows.map((r) => r.name), label: null },
          marks: [
            Plot.axisY({ textOverflow: "ellipsis", lineWidth: marginLeft / 7, tickSize: 0 }),
            Plot.ruleY(rows, {
              y: "name",
              x1: "p10",
              x2: "p90",
              stroke: "#2f7a63",
              strokeWidth: 6,
              strokeOpacity: 0.45,
            }),
            Plot.dot(rows, {
              y: "name",
              x: "median",
              fill: "#0f2e26",
              r: 4,
              title: (r: GroupRow) => `${r.name}: median ${r.median} ${unit}`,
            }),
            Plot.tickX(
              rows.filter((r) => r.bmdl !== null && r.bmdl > 0),
              { y: "name", x: "bmdl", stroke: "#b3261e", strokeWidth: 2 },
            ),
          ],
        };
      }}
    />
  );
}
