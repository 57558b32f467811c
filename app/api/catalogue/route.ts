import { getCatalogue } from "@/features/catalogue/server";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async () => json(await getCatalogue()));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
