import { sql } from "drizzle-orm";
import { getDb, getDbKind } from "@/db/client";
import { json, route, refuseOtherMethods } from "@/features/shared/server/http";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  const db = await getDb();
  await db.execute(sql`select 1`);
  return json({ status: "ok", database: await getDbKind() });
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = refuseOtherMethods("GET");
