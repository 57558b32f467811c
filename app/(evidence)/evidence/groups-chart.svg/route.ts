import { getSummaries } from "@/features/evidence/server";
import { chartQuerySchema, chartResponse, groupsChartSvg } from "@/features/evidence/components/chart-figures";
import { parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";
import { AppError } from "@/features/shared/errors";

export const dynamic = "force-dynamic";

/**
 * The evidence index's groups comparison as an SVG image, for wider screens (a phone gets it inline). The address
 * holds a dot, which no group slug can: it never shadows a group's page.
 */
export const GET = route(async (req) => {
  const q = parseQuery(req, chartQuerySchema);
  const chart = groupsChartSvg(await getSummaries(q.agent, q.condition), q.w);
  if (!chart) throw new AppError("not_found", "Fewer than two groups have tolerated doses to compare for this choice.");
  return chartResponse(req, chart, q);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
