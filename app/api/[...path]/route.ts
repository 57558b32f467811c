import { AppError } from "@/features/shared/errors";
import { route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Any /api address no route file serves: 404 in the error envelope rather than the HTML not-found page.
const missing = route(async (req) => {
  throw new AppError(
    "not_found",
    `There is no API at ${new URL(req.url).pathname}; the list of addresses is at /api/openapi.json.`,
  );
});

export const GET = missing;
export const POST = missing;
export const PUT = missing;
export const PATCH = missing;
export const DELETE = missing;
export const OPTIONS = missing;
