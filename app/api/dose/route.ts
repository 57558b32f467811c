import { doseQuerySchema } from "@/features/dosing";
import { planDoseFromQuery } from "@/features/catalogue/server";
import { json, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Public: no sign-in needed.
export const GET = route(async (req) => json(await planDoseFromQuery(parseQuery(req, doseQuerySchema))));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
