import "server-only";
import { count, eq, ne } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { authorize, canImportReports, type Caller } from "@/features/shared/policies";

const { reports } = schema;

/** What the import and export page shows: how many reports an export holds and how many came in by import. For admins. */
export async function getExchangeOverview({ actor }: Caller): Promise<{ exportable: number; imported: number }> {
  authorize(actor, canImportReports, "import or export reports");
  const db = await getDb();
  const [[exportable], [imported]] = await Promise.all([
    db.select({ n: count() }).from(reports).where(ne(reports.status, "draft")),
    db.select({ n: count() }).from(reports).where(eq(reports.source, "import")),
  ]);
  return { exportable: exportable?.n ?? 0, imported: imported?.n ?? 0 };
}
