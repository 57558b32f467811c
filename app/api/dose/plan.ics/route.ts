import { planIcsQuerySchema } from "@/features/dosing";
import { planCalendarFromQuery } from "@/features/evidence/server";
import { parseQuery, refuseOtherMethods, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Public, like the planner: the course as a calendar file.
export const GET = route(async (req) => {
  const body = await planCalendarFromQuery(parseQuery(req, planIcsQuerySchema));
  return new Response(body, {
    headers: {
      "content-type": "text/calendar; charset=utf-8",
      "content-disposition": 'attachment; filename="dose-plan.ics"',
    },
  });
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
