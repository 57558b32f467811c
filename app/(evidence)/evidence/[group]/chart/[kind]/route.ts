import { z } from "zod";
import { summaryQuerySchema } from "@/features/evidence";
import { getSummaryDetail } from "@/features/evidence/server";
import { CHART_KINDS, chartSvg } from "@/features/evidence/components/chart-figures";
import { CHART_WIDTHS, type ChartWidth } from "@/features/evidence/components/server-plot";
import { parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";
import { AppError } from "@/features/shared/errors";

export const dynamic = "force-dynamic";

const chartQuerySchema = summaryQuerySchema.extend({
  w: z.coerce
    .number({ error: `w must be a drawing width: ${CHART_WIDTHS.join(", ")}.` })
    .refine((w) => (CHART_WIDTHS as number[]).includes(w), `w must be a drawing width: ${CHART_WIDTHS.join(", ")}.`),
  /** The figures' fingerprint the page asked for: the image is cached for good only while it matches. */
  v: z.string().max(64).optional(),
});

/**
 * A group's evidence chart as an SVG image, for the group page's <picture>s: public figures only (the same as the
 * page and GET /api/summaries/{groupSlug}), cacheable, revalidated by ETag.
 */
export const GET = route<{ group: string; kind: string }>(async (req, { params }) => {
  const { group, kind } = await params;
  if (!(CHART_KINDS as readonly string[]).includes(kind)) {
    throw new AppError("not_found", `No chart called "${kind}": a group's charts are ${CHART_KINDS.join(", ")}.`);
  }
  const q = parseQuery(req, chartQuerySchema);
  const summary = await getSummaryDetail(group, q.agent, q.condition);
  const chart = chartSvg(summary, kind as (typeof CHART_KINDS)[number], q.w as ChartWidth);
  if (!chart) throw new AppError("not_found", "This group has no dose–response curve for these reports yet.");
  const etag = `"${chart.version}-${q.w}"`;
  const headers = {
    "Content-Type": "image/svg+xml; charset=utf-8",
    ETag: etag,
    // An address naming the current figures never changes; any other is rechecked after a minute.
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
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
