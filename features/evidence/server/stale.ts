import { sql } from "drizzle-orm";
import { getDb, type Db } from "@/db/client";
import { getClubSettings } from "@/features/catalogue/server";
import { METHOD_VERSION } from "../summary";
import { recomputeGroupAgent } from "./compute";

const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;

/**
 * Recomputes every group × agent whose stored summaries were made by an older method (or at another confidence
 * level), or stored before the group page's chart was stored with them: run when the app starts, so a new method's
 * figures appear without anyone accepting a report.
 */
export async function recomputeStale(db?: Db): Promise<number> {
  const d = db ?? (await getDb());
  const settings = await getClubSettings();
  const pairs = rowsOf<{ group_slug: string; agent_slug: string }>(
    await d.execute(sql`select distinct group_slug, agent_slug from evidence_summaries
                         where method_version <> ${METHOD_VERSION} or confidence_level <> ${settings.confidenceLevel}
                            or jsonb_typeof(detail->'pointBins') is null`),
  );
  let n = 0;
  for (const p of pairs) n += await recomputeGroupAgent(d, p.group_slug, p.agent_slug, settings);
  return n;
}
