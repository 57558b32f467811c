import { sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { fitDoseResponse, type DoseResponse, type Trial } from "../dose-response";

const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;

/**
 * The dose–response fit's input for one group × agent, for all conditions and each condition at once: accepted
 * reports grouped by distinct dose with their adverse and tolerated counts, folded into one row of arrays per
 * condition set so that few rows leave the database. Doses at or below zero stay in (their tolerated counts are
 * part of the summary's n); the fit drops them.
 * `accepted` and `tolerated` are the summary's own conditions on reports `r` (compute.ts), so the two agree.
 */
export function doseTrialsSql(accepted: SQL, tolerated: SQL) {
  return sql`
    select whole, c, array_agg(dose order by dose) as d, array_agg(na order by dose) as na, array_agg(nt order by dose) as nt
      from (select grouping(cond) = 1 as whole, cond as c, dose,
                   count(*) filter (where not tol)::int as na, count(*) filter (where tol)::int as nt
              from (select coalesce(r.condition_slug, '') as cond, r.concentration as dose, ${tolerated} as tol
                      from reports r
                     where ${accepted}) b
             group by grouping sets ((dose), (cond, dose))) g
     group by whole, c`;
}

export interface DoseTrials {
  trials: Trial[];
  /** Tolerated reports in the set (any dose): the n of the median interval's ranks. */
  tolerated: number;
}

/** One SQL aggregate, by condition set: key "*all*" for all conditions, else the condition slug ("" for none). */
export async function doseTrials(
  db: Pick<Db, "execute">,
  accepted: SQL,
  tolerated: SQL,
): Promise<Map<string, DoseTrials>> {
  const rows = rowsOf<{ whole: boolean; c: string | null; d: unknown[]; na: unknown[]; nt: unknown[] }>(
    await db.execute(doseTrialsSql(accepted, tolerated)),
  );
  const sets = new Map<string, DoseTrials>();
  for (const row of rows) {
    const trials: Trial[] = row.d.map((dose, i) => ({
      dose: Number(dose),
      adverse: Number(row.na[i]),
      n: Number(row.na[i]) + Number(row.nt[i]),
    }));
    sets.set(row.whole ? "*all*" : (row.c ?? ""), {
      trials,
      tolerated: row.nt.reduce<number>((sum, t) => sum + Number(t), 0),
    });
  }
  return sets;
}

/**
 * The same trials as doseTrials, built from the rows of one aggregate by condition and distinct dose (parallel
 * arrays: condition, dose, adverse count, tolerated count, in any order): each condition's own set, and the
 * all-conditions set "*all*" as their sum per distinct dose. Counts are integers, so the sums are exact and the
 * sets equal doseTrials' for the same reports (the fit sorts and merges by dose itself).
 */
export function trialSetsFrom(
  conds: unknown[],
  doses: unknown[],
  na: unknown[],
  nt: unknown[],
): Map<string, DoseTrials> {
  const sets = new Map<string, DoseTrials>();
  const all = new Map<number, Trial>();
  let allTolerated = 0;
  for (let i = 0; i < conds.length; i++) {
    const key = String(conds[i] ?? ""),
      dose = Number(doses[i]),
      adverse = Number(na[i]),
      tolerated = Number(nt[i]);
    let set = sets.get(key);
    if (!set) sets.set(key, (set = { trials: [], tolerated: 0 }));
    set.trials.push({ dose, adverse, n: adverse + tolerated });
    set.tolerated += tolerated;
    const t = all.get(dose);
    if (t) {
      t.adverse += adverse;
      t.n += adverse + tolerated;
    } else all.set(dose, { dose, adverse, n: adverse + tolerated });
    allTolerated += tolerated;
  }
  if (conds.length) sets.set("*all*", { trials: [...all.values()], tolerated: allTolerated });
  return sets;
}

/** The fit for one condition set (`fit: null` with a reason when it has too few reports, or none). */
export function doseResponseOf(sets: Map<string, DoseTrials>, key: string, level: number): DoseResponse {
  return fitDoseResponse(sets.get(key)?.trials ?? [], level);
}

/** Every condition set's fit of one group × agent (the bench times this part of the recompute alone). */
export async function doseResponses(
  db: Db,
  accepted: SQL,
  tolerated: SQL,
  level: number,
): Promise<Map<string, DoseResponse>> {
  const sets = await doseTrials(db, accepted, tolerated);
  return new Map([...sets.keys()].map((k) => [k, doseResponseOf(sets, k, level)]));
}
