import "server-only";
import type * as Plot from "@observablehq/plot";
import { isFitted } from "../dose-response";
import type { getSummaryDetail } from "../server";
import { doseChartDrawings, type DoseChartProps } from "./dose-chart";
import { riskChartDrawing, type RiskChartProps } from "./risk-chart";
import { chartVersion, drawChart, type ChartWidth } from "./server-plot";

type SummaryDetail = Awaited<ReturnType<typeof getSummaryDetail>>;

/** The group page's charts that are also served as images. */
export const CHART_KINDS = ["dose", "band", "risk"] as const;
export type ChartKind = (typeof CHART_KINDS)[number];

/** The dose charts' figures, from a group's summary. */
export function doseChartProps(s: SummaryDetail): DoseChartProps {
  const d = s.toleratedDose;
  return {
    unit: s.unit,
    points: s.points,
    pointBins: s.pointBins,
    p25: d.p25,
    p75: d.p75,
    median: d.median,
    medianInterval: d.medianInterval,
    lowestAdverse: s.lowestAdverseDose,
    bands: s.bands,
  };
}

/** The risk chart's figures, from a group's summary; null where no curve was fitted. */
export function riskChartProps(s: SummaryDetail): RiskChartProps | null {
  const dr = isFitted(s.doseResponse) ? s.doseResponse : null;
  if (!dr) return null;
  return {
    unit: s.unit,
    level: s.confidenceLevel,
    curve: dr.curve,
    bmd: dr.bmd,
    bmdl: dr.bmdl,
    points: s.points,
    pointBins: s.pointBins,
  };
}

function drawingOf(s: SummaryDetail, kind: ChartKind): { key: string; build: (w: number) => Plot.PlotOptions } | null {
  if (kind === "risk") {
    const props = riskChartProps(s);
    return props && riskChartDrawing(props);
  }
  const charts = doseChartDrawings(doseChartProps(s));
  return { key: charts.key, build: charts[kind] };
}

/** A chart of a group's summary as an SVG document at a drawing width; null where the summary has no such chart. */
export function chartSvg(
  s: SummaryDetail,
  kind: ChartKind,
  width: ChartWidth,
): { svg: string; version: string } | null {
  const drawing = drawingOf(s, kind);
  if (!drawing) return null;
  const svg = drawChart(`${kind}\u0000${drawing.key}`, width, drawing.build);
  return {
    svg: svg.replace("<svg ", '<svg xmlns="http://www.w3.org/2000/svg" '),
    version: chartVersion(drawing.key),
  };
}

/**
 * The address of a group's chart image at a width. `v` fingerprints the figures, so a page showing new figures asks
 * for a new address (and a cached image of older figures is never shown beside them).
 */
export function chartSrc(s: SummaryDetail, kind: ChartKind): (width: ChartWidth) => string {
  const drawing = drawingOf(s, kind);
  const v = drawing ? chartVersion(drawing.key) : "";
  return (width) =>
    `/evidence/${encodeURIComponent(s.group.slug)}/chart/${kind}?${new URLSearchParams({
      agent: s.agent,
      ...(s.condition ? { condition: s.condition } : {}),
      w: String(width),
      v,
    })}`;
}
