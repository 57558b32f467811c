import { getCatalogue } from "@/features/catalogue/server";
import { json, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async () => json(await getCatalogue()));
