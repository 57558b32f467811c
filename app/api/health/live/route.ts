import { json } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

// Liveness without touching the database (for load balancers; also the benchmark's trivial route).
export async function GET(): Promise<Response> {
  return json({ status: "ok" });
}
