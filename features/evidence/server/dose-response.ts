import { sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { fitDoseResponse, type DoseResponse, type Trial } from "../dose-response";

const rowsOf = <T,>(r: unknown) => (r as { rows: T[] }).rows;

/**
 * The dose–response fit's input for one group × agent, for all conditions and each condition at once: accepted
 * reports with a dose above zero, grouped by distinct dose with their adverse and tolerated counts, folded into
 * one row of arrays per condition set so that few rows leave the database.
 * `accepted` and `tolerated` are the summary's own conditions on reports `r` (compute.ts), so the two agree.
 */
export function doseTrialsSql(accepted: SQL, tolerated: SQL) {
  return sql`
    select whole, c, array_agg(dose order by dose) as d, array_agg(na order by dose) as na, array_agg(nt order by dose) as nt
      from (select grouping(cond) = 1 as whole, cond as c, dose,
                   count(*) filter (where not tol)::int as na, count(*) filter (where tol)::int as nt
              from (select coalesce(r.condition_slug, '') as cond, r.concentration as dose, ${tolerated} as tol
                      from reports r
                     where ${accepted} and r.concentration > 0) b
             group by grouping sets ((dose), (cond, dose))) g
     group by whole, c`;
}

/**
 * Fits the dose–response model for every condition set of one group × agent from one SQL aggregate.
 * Returns a lookup by condition key ("" or null for all conditions); a set with no dosed reports gets `fit: null`.
 */
export async function doseResponses(db: Db, accepted: SQL, tolerated: SQL, level: number): Promise<(condition: string | null) => DoseResponse> {
  const rows = rowsOf<{ whole: boolean; c: string | null; d: unknown[]; na: unknown[]; nt: unknown[] }>(await db.execute(doseTrialsSql(accepted, tolerated)));
  const fits = new Map<string, DoseResponse>();
  for (const row of rows) {
    const trials: Trial[] = row.d.map((dose, i) => ({ dose: Number(dose), adverse: Number(row.na[i]), n: Number(row.na[i]) + Number(row.nt[i]) }));
    fits.set(row.whole ? "*all*" : (row.c ?? ""), fitDoseResponse(trials, level));
  }
  return (condition) => fits.get(condition === null ? "*all*" : condition) ?? fitDoseResponse([], level);
}
