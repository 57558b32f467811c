import "server-only";
import { sql } from "drizzle-orm";
import { getDb, getDbKind } from "@/db/client";

/** Public: the service answers and its database runs a query. Reveals only which kind of database. */
export async function checkHealth(): Promise<{ status: "ok"; database: Awaited<ReturnType<typeof getDbKind>> }> {
  const db = await getDb();
  await db.execute(sql`select 1`);
  return { status: "ok", database: await getDbKind() };
}
