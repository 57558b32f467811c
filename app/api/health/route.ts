import { json, route } from "@/features/shared/server/http";
import { checkHealth } from "@/features/shared/server/health";

export const dynamic = "force-dynamic";

export const GET = route(async () => json(await checkHealth()));
