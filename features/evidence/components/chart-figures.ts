import "server-only";
import type * as Plot from "@observablehq/plot";
import { z } from "zod";
import { summaryQuerySchema } from "../summary";
import { isFitted } from "../dose-response";
import type { getSummaries, getSummaryDetail } from "../server";
import { doseChartDrawings, type DoseChartProps } from "./dose-chart";
import { groupsChartDrawing, type GroupRow } from "./groups-chart";
import { riskChartDrawing, type RiskChartProps } from "./risk-chart";
import { CHART_WIDTHS, chartVersion, drawChart, type ChartWidth } from "./server-plot";

type SummaryDetail = Awaited<ReturnType<typeof getSummaryDetail>>;
type SummaryList = Awaited<ReturnType<typeof getSummaries>>;

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

/** The groups comparison's rows: groups with a tolerated range to draw (doses above zero, for the log axis). */
export function groupsChartRows(s: SummaryList): GroupRow[] {
  return s.groups.flatMap((g) => {
    const d = g.toleratedDose;
    if (d.p10 == null || d.p90 == null || d.median == null || d.p10 <= 0) return [];
    return [{ name: g.group.name, p10: d.p10, p90: d.p90, median: d.median, bmdl: g.doseResponse?.bmdl ?? null }];
  });
}

/** The groups comparison as an SVG document at a drawing width; null where fewer than two groups can be drawn. */
export function groupsChartSvg(s: SummaryList, width: ChartWidth): { svg: string; version: string } | null {
  const rows = groupsChartRows(s);
  if (rows.length < 2) return null;
  const drawing = groupsChartDrawing(s.unit, rows);
  return {
    svg: drawChart(`groups\u0000${drawing.key}`, width, drawing.build).replace(
      "<svg ",
      '<svg xmlns="http://www.w3.org/2000/svg" ',
    ),
    version: chartVersion(drawing.key),
  };
}

/** The address of the groups comparison image at a width (`v` as for chartSrc). */
export function groupsChartSrc(s: SummaryList, condition: string | undefined): (width: ChartWidth) => string {
  const v = chartVersion(groupsChartDrawing(s.unit, groupsChartRows(s)).key);
  return (width) =>
    `/evidence/groups-chart.svg?${new URLSearchParams({
      agent: s.agent,
      ...(condition ? { condition } : {}),
      w: String(width),
      v,
    })}`;
}

/** A chart image's query: the summary's, a drawing width, and the figures' fingerprint the page asked for. */
export const chartQuerySchema = summaryQuerySchema.extend({
  w: z.coerce
    .number({ error: `w must be a drawing width: ${CHART_WIDTHS.join(", ")}.` })
    .refine((w) => (CHART_WIDTHS as number[]).includes(w), `w must be a drawing width: ${CHART_WIDTHS.join(", ")}.`)
    .transform((w) => w as ChartWidth),
  v: z.string().max(64).optional(),
});

/**
 * A chart image's response: cached for good under an address naming the current figures (`v`), rechecked after a
 * minute under any other; revalidated by ETag (304 when unchanged).
 */
export function chartResponse(req: Request, chart: { svg: string; version: string }, q: { w: number; v?: string }) {
  const etag = `"${chart.version}-${q.w}"`;
  const headers = {
    "Content-Type": "image/svg+xml; charset=utf-8",
    ETag: etag,
    "Cache-Control": q.v === chart.version ? "public, max-age=31536000, immutable" : "public, max-age=60",
    "X-Content-Type-Options": "nosniff",
  };
  if (
    req.headers
      .get("if-none-match")
      ?.split(/\s*,\s*/)
      .includes(etag)
  ) {
    return new Response(null, { status: 304, headers });
  }
  return new Response(chart.svg, { headers });
}
