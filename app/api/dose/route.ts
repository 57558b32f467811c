import { doseQuerySchema } from "@/features/dosing";
import { planDoseWithEvidence } from "@/features/evidence/server";
import { json, parseQuery, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Public: no sign-in needed.
export const GET = route(async (req) => json(await planDoseWithEvidence(parseQuery(req, doseQuerySchema))));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
