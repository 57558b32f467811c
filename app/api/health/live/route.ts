import { json, refuseOtherMethods, route } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Liveness without touching the database (for load balancers; also the benchmark's trivial route).
export const GET = route(async () => json({ status: "ok" }));

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
