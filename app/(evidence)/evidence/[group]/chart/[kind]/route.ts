import { getSummaryDetail } from "@/features/evidence/server";
import {
  CHART_KINDS,
  chartQuerySchema,
  chartResponse,
  chartSvg,
  type ChartKind,
} from "@/features/evidence/components/chart-figures";
import { parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";
import { AppError } from "@/features/shared/errors";

export const dynamic = "force-dynamic";

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
  const chart = chartSvg(await getSummaryDetail(group, q.agent, q.condition), kind as ChartKind, q.w);
  if (!chart) throw new AppError("not_found", "This group has no dose–response curve for these reports yet.");
  return chartResponse(req, chart, q);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
