import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { getClubSettings } from "@/features/catalogue/server";
import { medianRank, wilson } from "../stats";
import { announceEvidenceChange, invalidateSummaryCache } from "./cache";
import { doseResponseOf, trialSetsFrom, type DoseTrials } from "./dose-response";
import { METHOD_VERSION, type Band, type Summary, type SummaryDetail } from "../summary";

const { evidenceSummaries, agents, speciesGroups } = schema;

interface Row {
  whole: boolean;
  c: string | null;
  reports: number;
  members: number;
  fish: number;
  tolerated: number;
  q: number[] | null;
  lowest_adverse: number | null;
  /** x₍r₎ and x₍n−r+1₎ of the tolerated doses, when the set has a median interval. */
  mi: number[] | null;
  bn: number[];
  bt: number[];
  bc: number[];
}

const rowsOf = <T>(r: unknown) => (r as { rows: T[] }).rows;
const toNum = (x: unknown) => (x === null || x === undefined ? null : Number(x));

/** A report counts as tolerated: no fish lost to the treatment or an unknown cause, and no severe distress. */
const TOLERATED = sql.raw(
  "(not (coalesce(r.fish_lost, 0) > 0 and coalesce(r.loss_cause, 'unknown') in ('treatment', 'unknown')) and coalesce(r.distress, 'none') <> 'severe')",
);

const accepted = (groupSlug: string, agentSlug: string) =>
  sql`r.status = 'accepted' and r.group_slug = ${groupSlug} and r.agent_slug = ${agentSlug} and r.concentration is not null`;

/** Tolerated-report counts per condition set (all conditions, then each): the n the median ranks need. */
export function toleratedCountsSql(groupSlug: string, agentSlug: string) {
  return sql`select grouping(c) = 1 as whole, c, count(*)::int as n
               from (select coalesce(r.condition_slug, '') as c from reports r where ${accepted(groupSlug, agentSlug)} and ${TOLERATED}) t
              group by grouping sets ((), (c))`;
}

/** percentile_disc(f) returns x₍⌈f·n⌉₎; (k − ½)/n picks x₍k₎ without rounding trouble. */
const disc = (k: number, n: number) => (k - 0.5) / n;

/**
 * Every figure of one group × agent's summaries, for all conditions and each condition at once
 * (grouping sets), in one SQL statement: counts, type-7 quantiles of tolerated doses (percentile_cont),
 * the order statistics of the median interval (percentile_disc at the ranks worked out from n), the
 * lowest adverse dose, and per-band report, tolerated and cleared counts.
 */
export function summarySql(
  groupSlug: string,
  agentSlug: string,
  edges: number[],
  ranks: Map<string, { r: number; n: number }>,
) {
  const edgeArray = sql.raw(`array[${edges.map(Number).join(",")}]::float8[]`);
  const buckets = Array.from({ length: edges.length + 1 }, (_, i) => i);
  const counts = (extra: string) =>
    sql.raw(`array[${buckets.map((b) => `count(*) filter (where bucket = ${b}${extra})::int`).join(", ")}]`);
  // The median interval's fractions per set, as a CASE on the set's key (constants: evaluated once per group).
  // Direct arguments may name grouping columns only: in the all-conditions row, cond is null.
  const cases = [...ranks.entries()].map(
    ([key, { r, n }]) =>
      sql`when ${key === "*all*" ? sql`cond is null` : sql`cond = ${key}`} then array[${disc(r, n)}::float8, ${disc(n - r + 1, n)}::float8]`,
  );
  const fractions = cases.length ? sql`case ${sql.join(cases, sql` `)} end` : sql`null::float8[]`;
  return sql`
    with base as (
      select coalesce(r.external_reporter, r.author_id) as author_id, r.fish_count, r.concentration as dose, coalesce(r.condition_slug, '') as cond,
             ${TOLERATED} as tol, r.condition_outcome = 'cleared' as clr, width_bucket(r.concentration, ${edgeArray}) as bucket
        from reports r
       where ${accepted(groupSlug, agentSlug)}
    )
    select grouping(cond) = 1 as whole, cond as c,
           count(*)::int as reports,
           count(distinct author_id)::int as members,
           coalesce(sum(fish_count), 0)::int as fish,
           count(*) filter (where tol)::int as tolerated,
           percentile_cont(array[0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]::float8[]) within group (order by dose) filter (where tol) as q,
           percentile_disc(${fractions}) within group (order by dose) filter (where tol) as mi,
           min(dose) filter (where not tol) as lowest_adverse,
           ${counts("")} as bn, ${counts(" and tol")} as bt, ${counts(" and clr")} as bc
      from base
     group by grouping sets ((), (cond))`;
}

/**
 * Everything one group × agent's recompute reads, in one statement and one scan of its reports: the figures of
 * summarySql for all conditions and each (but the median interval, which is read off the trials), and, on the
 * all-conditions row, the reports by condition and distinct dose with their adverse and tolerated counts — the
 * dose–response fit's input, from the same scan (a materialised CTE) instead of a second pass over the reports.
 */
export function pairFiguresSql(groupSlug: string, agentSlug: string, edges: number[]) {
  const edgeArray = sql.raw(`array[${edges.map(Number).join(",")}]::float8[]`);
  const buckets = Array.from({ length: edges.length + 1 }, (_, i) => i);
  const counts = (extra: string) =>
    sql.raw(`array[${buckets.map((b) => `count(*) filter (where bucket = ${b}${extra})::int`).join(", ")}]`);
  return sql`
    with base as materialized (
      select coalesce(r.external_reporter, r.author_id) as author_id, r.fish_count, r.concentration as dose, coalesce(r.condition_slug, '') as cond,
             ${TOLERATED} as tol, r.condition_outcome = 'cleared' as clr, width_bucket(r.concentration, ${edgeArray}) as bucket,
             r.species_id as sid, case when r.species_id is null then coalesce(r.species_other, '?') end as sother
        from reports r
       where ${accepted(groupSlug, agentSlug)}
    ), trials as (
      select cond, dose, count(*) filter (where not tol)::int as na, count(*) filter (where tol)::int as nt from base group by cond, dose
    ), packed as (
      select array_agg(cond) as tc, array_agg(dose) as td, array_agg(na) as tna, array_agg(nt) as tnt from trials
    ), figs as (
    select grouping(cond) = 1 as whole, cond as c,
           count(*)::int as reports,
           count(distinct author_id)::int as members,
           coalesce(sum(fish_count), 0)::int as fish,
           count(*) filter (where tol)::int as tolerated,
           percentile_cont(array[0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]::float8[]) within group (order by dose) filter (where tol) as q,
           min(dose) filter (where not tol) as lowest_adverse,
           min(dose) as lo, max(dose) as hi,
           ${counts("")} as bn, ${counts(" and tol")} as bt, ${counts(" and clr")} as bc,
           case when grouping(cond) = 1 then (select tc from packed) end as tc,
           case when grouping(cond) = 1 then (select td from packed) end as td,
           case when grouping(cond) = 1 then (select tna from packed) end as tna,
           case when grouping(cond) = 1 then (select tnt from packed) end as tnt
      from base
     group by grouping sets ((), (cond))
    ), sets as (
      select whole, c, reports as n, lo, hi from figs
    ), fine as (
      -- The reports by condition, dose and outcome, and by condition and species: the chart's input, a few thousand
      -- rows however many reports; each row then counts once in the all-conditions set and once in its condition's.
      select cond, dose, tol, coalesce(clr, false) as clr, count(*)::int as cnt from base group by 1, 2, 3, 4
    ), b as (
      select s.whole, s.c, s.n, s.lo, s.hi, f.dose, f.tol, f.clr, f.cnt from fine f join sets s on s.whole or s.c = f.cond
    ), pts as (
      select whole, c, ${POINTS_AGG} as pts
        from (select b.* from b cross join generate_series(1, b.cnt) where b.n <= ${POINTS_LIMIT}) x
       group by whole, c
    ), bins as (
      select whole, c, json_agg(json_build_array(k, bn, bt, bc) order by k) as bins
        from (select whole, c, ${BIN_OF} as k, sum(cnt)::int as bn, coalesce(sum(cnt) filter (where tol), 0)::int as bt,
                     coalesce(sum(cnt) filter (where clr), 0)::int as bc
                from b where n > ${POINTS_LIMIT} group by whole, c, k) x
       group by whole, c
    ), spf as (
      select cond, sid, sother, count(*)::int as cnt from base group by 1, 2, 3
    ), sp as (
      select whole, c, json_agg(json_build_array(sid, sother, sn)) as sp
        from (select s.whole, s.c, f.sid, f.sother, sum(f.cnt)::int as sn
                from spf f join sets s on s.whole or s.c = f.cond group by s.whole, s.c, f.sid, f.sother) x
       group by whole, c
    )
    select figs.*, pts.pts, bins.bins, sp.sp
      from figs
      left join pts on pts.whole = figs.whole and pts.c is not distinct from figs.c
      left join bins on bins.whole = figs.whole and bins.c is not distinct from figs.c
      left join sp on sp.whole = figs.whole and sp.c is not distinct from figs.c`;
}

/** x₍r₎ and x₍n−r+1₎ of a set's tolerated doses (n = its tolerated count), or null without a median interval. */
function medianIntervalOf(set: DoseTrials | undefined, level: number): number[] | null {
  if (!set) return null;
  const rank = medianRank(set.tolerated, level);
  if (!rank) return null;
  const byDose = set.trials.filter((t) => t.n - t.adverse > 0).sort((p, q) => p.dose - q.dose);
  const nth = (k: number) => {
    let seen = 0;
    for (const t of byDose) {
      seen += t.n - t.adverse;
      if (seen >= k) return t.dose;
    }
    return null;
  };
  const low = nth(rank.r),
    high = nth(set.tolerated - rank.r + 1);
  return low === null || high === null ? null : [low, high];
}

function bandsFrom(edges: number[], row: Row, level: number): Band[] {
  const out: Band[] = [];
  // width_bucket: bucket i holds edges[i-1] <= x < edges[i]; edges.length holds x >= the last edge.
  for (let i = 1; i <= edges.length; i++) {
    const n = Number(row.bn[i] ?? 0),
      t = Number(row.bt[i] ?? 0),
      cl = Number(row.bc[i] ?? 0);
    if (i === edges.length && n === 0) continue;
    out.push({
      from: edges[i - 1]!,
      to: i < edges.length ? edges[i]! : null,
      reports: n,
      tolerated: t,
      toleratedShare: wilson(t, n, level),
      cleared: cl,
      clearedShare: wilson(cl, n, level),
    });
  }
  return out;
}

export function summaryFromRow(
  row: Row,
  group: { slug: string; name: string },
  edges: number[],
  level: number,
  minReports: number,
): Summary & { bands: Band[] } {
  const q = row.q ? row.q.map(Number) : null;
  const nt = Number(row.tolerated);
  const rank = medianRank(nt, level);
  const mi = row.mi ? row.mi.map(Number) : null;
  return {
    group,
    reports: Number(row.reports),
    members: Number(row.members),
    fish: Number(row.fish),
    tolerated: nt,
    toleratedShare: wilson(nt, Number(row.reports), level),
    toleratedDose: {
      min: q ? q[0]! : null,
      p10: q ? q[1]! : null,
      p25: q ? q[2]! : null,
      median: q ? q[3]! : null,
      p75: q ? q[4]! : null,
      p90: q ? q[5]! : null,
      max: q ? q[6]! : null,
      medianInterval: rank && mi ? { low: mi[0]!, high: mi[1]!, coverage: rank.coverage } : null,
    },
    lowestAdverseDose: toNum(row.lowest_adverse),
    sparse: Number(row.reports) < minReports,
    bands: bandsFrom(edges, row, level),
  };
}

/** Above this many reports the chart gets counts per narrow dose bin instead of one point per report. */
export const POINTS_LIMIT = 300;
/** How many bins the group's dose range is cut into (log-spaced where every dose is above zero). */
export const POINT_BINS = 60;

export interface PointBin {
  from: number;
  to: number;
  reports: number;
  tolerated: number;
  cleared: number;
}

/**
 * Bin k (1..POINT_BINS) of a dose over its set's [lo, hi]: on log dose when lo > 0 (doses span decades), else linear.
 * The top edge belongs to the last bin; a single distinct dose is one bin. CASE keeps ln() and width_bucket away
 * from the cases they refuse. One text for the live read and the recompute, so both cut the same bins.
 */
const binOf = (lo: string, hi: string, dose: string) =>
  sql.raw(`case when ${hi} = ${lo} then 1
    when ${lo} > 0 then least(width_bucket(ln(${dose}), ln(${lo}), ln(${hi}), ${POINT_BINS}), ${POINT_BINS})
    else least(width_bucket(${dose}, ${lo}, ${hi}, ${POINT_BINS}), ${POINT_BINS}) end`);
const BIN_OF = binOf("lo", "hi", "dose");

/** One report as "dose:code" (code = tolerated·2 + cleared), in dose order; ties by code, so the order is fixed. */
const pointsAgg = (q: string) =>
  sql.raw(
    `string_agg(${q}dose::text || ':' || (${q}tol::int * 2 + coalesce(${q}clr, false)::int)::text, ',' order by ${q}dose, ${q}tol, coalesce(${q}clr, false))`,
  );
const POINTS_AGG = pointsAgg("");

export interface ChartFigures {
  points: { dose: number; tolerated: boolean; cleared: boolean }[];
  pointBins: PointBin[];
}

/** The chart's figures from the SQL's packed points ("dose:code,…") or bins ([k, n, tolerated, cleared], …). */
function chartFrom(pts: string | null, rawBins: unknown, lo: number | null, hi: number | null): ChartFigures {
  const points = (pts ? pts.split(",") : []).map((p) => {
    const [dose, code] = p.split(":");
    const c = Number(code);
    return { dose: Number(dose), tolerated: c >= 2, cleared: c % 2 === 1 };
  });
  const bins = json<[number, number, number, number][]>(rawBins) ?? [];
  // The bins' edges, worked out the way the SQL cut them (only bins holding reports are sent).
  const edge = (k: number) => {
    if (lo === null || hi === null || hi === lo) return k === 0 ? (lo ?? 0) : (hi ?? 0);
    return lo > 0
      ? Math.exp(Math.log(lo) + (k / POINT_BINS) * (Math.log(hi) - Math.log(lo)))
      : lo + (k / POINT_BINS) * (hi - lo);
  };
  const pointBins: PointBin[] = bins.map(([k, n, t, c]) => ({
    from: Number(k) === 1 ? lo! : edge(Number(k) - 1),
    to: Number(k) === POINT_BINS || hi === lo ? hi! : edge(Number(k)),
    reports: Number(n),
    tolerated: Number(t),
    cleared: Number(c),
  }));
  return { points, pointBins };
}

const json = <T>(v: unknown) => (typeof v === "string" ? JSON.parse(v) : v) as T | null;

/** A contributing species as the recompute stores it: its id, or (no id) the name the reporter typed; its reports. */
export type SpeciesCount = [id: string | null, other: string | null, reports: number];

/**
 * The contributing species, names read now (a renamed species shows its new name), most reports first. The same
 * grouping and order as the live read: by species, or by the typed name where a report names none.
 */
const speciesListSql = (counts: ReturnType<typeof sql>) => sql`
  select coalesce(json_agg(json_build_array(x.id, x.common_name, x.scientific_name, x.n) order by x.n desc, x.common_name, x.id), '[]')
    from (select e->>0 as id, coalesce(s.common_name, e->>1, '?') as common_name, s.scientific_name, (e->>2)::int as n
            from jsonb_array_elements(${counts}) e left join species s on s.id = e->>0) x`;

function speciesFrom(raw: unknown) {
  const sp = json<[string | null, string, string | null, number][]>(raw);
  return (sp ?? []).map(([id, commonName, scientificName, n]) => ({
    id,
    commonName,
    scientificName,
    reports: Number(n),
  }));
}

/**
 * The chart's anonymous points and the contributing species of one group × agent, read live from its reports: the
 * fallback where no figures are stored yet (the recompute stores the same, see pairFiguresSql). At or below
 * POINTS_LIMIT reports, one point per report and no bins; above it, no points and the reports counted per dose bin
 * in SQL, so a page at any size ships a few dozen rows.
 */
export async function getPointsAndSpecies(groupSlug: string, agentSlug: string, conditionSlug: string) {
  const db = await getDb();
  const cond = conditionSlug ? sql`and r.condition_slug = ${conditionSlug}` : sql``;
  const bucket = binOf("st.lo", "st.hi", "b.dose");
  const [row] = rowsOf<{
    n: number;
    lo: number | null;
    hi: number | null;
    pts: string | null;
    bins: unknown;
    species: unknown;
  }>(
    await db.execute(sql`
      with b as (
        select r.concentration as dose, ${TOLERATED} as tol, r.condition_outcome = 'cleared' as clr
          from reports r
         where ${accepted(groupSlug, agentSlug)} ${cond}
      ), st as (select count(*)::int as n, min(dose) as lo, max(dose) as hi from b)
      select st.n, st.lo, st.hi,
             case when st.n <= ${POINTS_LIMIT} then (select ${pointsAgg("b.")} from b) end as pts,
             case when st.n > ${POINTS_LIMIT} then
               (select json_agg(json_build_array(x.k, x.n, x.t, x.c) order by x.k)
                  from (select ${bucket} as k, count(*)::int as n, count(*) filter (where b.tol)::int as t, count(*) filter (where b.clr)::int as c
                          from b group by 1) x)
             end as bins,
             (select json_agg(json_build_array(x.species_id, x.common_name, x.scientific_name, x.n) order by x.n desc, x.common_name, x.species_id)
                from (select r2.species_id, coalesce(s.common_name, r2.species_other, '?') as common_name, s.scientific_name, count(*)::int as n
                        from reports r2 left join species s on s.id = r2.species_id
                       where r2.status = 'accepted' and r2.group_slug = ${groupSlug} and r2.agent_slug = ${agentSlug} and r2.concentration is not null
                             ${conditionSlug ? sql`and r2.condition_slug = ${conditionSlug}` : sql``}
                       group by 1, 2, 3) x) as species
        from st`),
  );
  return {
    ...chartFrom(row?.pts ?? null, row?.bins, toNum(row?.lo), toNum(row?.hi)),
    species: speciesFrom(row?.species),
  };
}

/** A statement runner: the database or an open transaction. */
export type Runner = Pick<Db, "select" | "execute" | "insert" | "delete">;
type Settings = { confidenceLevel: number; minReports: number };

/** Advisory-lock namespace of evidence pairs (the first key of the two-key form). */
const LOCK_NAMESPACE = 0x7a4e;

/** A 32-bit FNV-1a hash of the pair, as a signed int: the second key of its advisory lock. */
function pairLockKey(groupSlug: string, agentSlug: string): number {
  let h = 0x811c9dc5;
  for (const ch of `${groupSlug}\u0000${agentSlug}`) {
    h ^= ch.codePointAt(0)!;
    h = Math.imul(h, 0x01000193);
  }
  return h | 0;
}

/**
 * Takes the pair's lock until the transaction ends, so two recomputes of one pair (two processes, or the
 * poll and a wake-up) run one after the other and the later one reads the later reports. A hash collision
 * only serialises two unrelated pairs. Plain PostgreSQL functions: PGlite and a server alike.
 */
export async function lockPair(tx: Runner, groupSlug: string, agentSlug: string): Promise<void> {
  await tx.execute(
    sql`select pg_advisory_xact_lock(${LOCK_NAMESPACE}::int, ${pairLockKey(groupSlug, agentSlug)}::int)`,
  );
}

/**
 * Recomputes one group × agent (all conditions) through `tx` and replaces its stored rows; rows without
 * reports any more disappear. Run it inside a transaction holding the pair's lock, so the reads and the
 * replacement are one snapshot-consistent step. Returns how many summary rows it stored.
 */
export async function replacePairFigures(
  tx: Runner,
  groupSlug: string,
  agentSlug: string,
  s: Settings,
): Promise<number> {
  // The agent's band edges and the group's name in one round trip: no row when either is missing.
  const [pair] = await tx
    .select({ bandEdges: agents.bandEdges, slug: speciesGroups.slug, name: speciesGroups.name })
    .from(agents)
    .innerJoin(speciesGroups, eq(speciesGroups.slug, groupSlug))
    .where(eq(agents.slug, agentSlug));
  if (!pair) return 0;
  const group = { slug: pair.slug, name: pair.name };
  const edges = [...pair.bandEdges].sort((a, b) => a - b);
  // One statement: every figure, and the reports by condition and distinct dose (the fit's trials, whose tolerated
  // doses also give the median interval's order statistics).
  const rows = rowsOf<
    Row & {
      tc: unknown[] | null;
      td: unknown[] | null;
      tna: unknown[] | null;
      tnt: unknown[] | null;
      lo: unknown;
      hi: unknown;
      pts: string | null;
      bins: unknown;
      sp: unknown;
    }
  >(await tx.execute(pairFiguresSql(groupSlug, agentSlug, edges)));
  const whole = rows.find((r) => r.whole);
  const sets = trialSetsFrom(whole?.tc ?? [], whole?.td ?? [], whole?.tna ?? [], whole?.tnt ?? []);
  for (const row of rows) row.mi = medianIntervalOf(sets.get(row.whole ? "*all*" : (row.c ?? "")), s.confidenceLevel);
  const values = [];
  for (const row of rows) {
    // Each condition set's fit is tens of milliseconds of JS: the event loop gets a turn between them, so a
    // recompute (after every import batch, every accept) never holds the server for all of a pair's fits at once.
    if (values.length) await new Promise<void>((resolve) => setImmediate(resolve));
    const { bands, ...summary } = summaryFromRow(row, group, edges, s.confidenceLevel, s.minReports);
    values.push({
      groupSlug,
      agentSlug,
      conditionSlug: row.whole ? "" : (row.c ?? ""),
      methodVersion: METHOD_VERSION,
      confidenceLevel: s.confidenceLevel,
      reports: Number(row.reports),
      summary: {
        ...summary,
        doseResponse: doseResponseOf(sets, row.whole ? "*all*" : (row.c ?? ""), s.confidenceLevel),
      },
      // The group page's chart and species, stored with the figures so the page reads no reports.
      detail: {
        bands,
        ...chartFrom(row.pts, row.bins, toNum(row.lo), toNum(row.hi)),
        speciesCounts: json<SpeciesCount[]>(row.sp) ?? [],
      },
      computedAt: new Date(),
    });
  }
  await tx
    .delete(evidenceSummaries)
    .where(and(eq(evidenceSummaries.groupSlug, groupSlug), eq(evidenceSummaries.agentSlug, agentSlug)));
  if (values.length) await tx.insert(evidenceSummaries).values(values);
  // Other processes' cached evidence goes stale when this commits (never if it rolls back).
  await announceEvidenceChange(tx, groupSlug, agentSlug);
  return values.length;
}

/** Recomputes and stores one group × agent now, under its lock, in one transaction (benchmarks, scripts). */
export async function recomputeGroupAgent(
  db: Db,
  groupSlug: string,
  agentSlug: string,
  settings?: Settings,
): Promise<number> {
  const n = await db.transaction(async (tx) => {
    await lockPair(tx, groupSlug, agentSlug);
    return replacePairFigures(tx, groupSlug, agentSlug, settings ?? (await getClubSettings(tx)));
  });
  invalidateSummaryCache();
  return n;
}

/** The list figures of every group for an agent (small rows: no points). */
export async function getStoredSummaries(agentSlug: string, conditionSlug: string) {
  const db = await getDb();
  return db
    .select({ groupSlug: evidenceSummaries.groupSlug, summary: evidenceSummaries.summary })
    .from(evidenceSummaries)
    .where(and(eq(evidenceSummaries.agentSlug, agentSlug), eq(evidenceSummaries.conditionSlug, conditionSlug)));
}

/**
 * One group's stored summary with its bands, and its chart and species when the recompute stored them (rows
 * stored before it did carry bands only: `chart` is then null). `pairStored` says whether the pair has been
 * recomputed at all (its all-conditions row exists), so a missing condition row means no reports in it.
 */
export async function getStoredSummary(
  groupSlug: string,
  agentSlug: string,
  conditionSlug: string,
): Promise<{
  summary: Summary & { bands: Band[] };
  chart: (ChartFigures & { species: SummaryDetail["species"] }) | null;
} | null> {
  const db = await getDb();
  const [row] = rowsOf<{ summary: unknown; detail: unknown; species: unknown }>(
    await db.execute(sql`
      select es.summary, es.detail - 'speciesCounts' as detail,
             case when jsonb_typeof(es.detail->'speciesCounts') = 'array'
                  then (${speciesListSql(sql`es.detail->'speciesCounts'`)}) end as species
        from evidence_summaries es
       where es.group_slug = ${groupSlug} and es.agent_slug = ${agentSlug} and es.condition_slug = ${conditionSlug}`),
  );
  if (!row) return null;
  const detail = json<{ bands: Band[] } & Partial<ChartFigures>>(row.detail)!;
  const summary = { ...json<Summary>(row.summary)!, bands: detail.bands };
  const chart =
    Array.isArray(detail.points) && Array.isArray(detail.pointBins) && row.species !== null
      ? { points: detail.points, pointBins: detail.pointBins, species: speciesFrom(row.species) }
      : null;
  return { summary, chart };
}

/** Whether the pair's figures have been stored (its all-conditions row exists once any recompute ran). */
export async function isPairStored(groupSlug: string, agentSlug: string): Promise<boolean> {
  const db = await getDb();
  const [row] = await db
    .select({ one: sql<number>`1` })
    .from(evidenceSummaries)
    .where(
      and(
        eq(evidenceSummaries.groupSlug, groupSlug),
        eq(evidenceSummaries.agentSlug, agentSlug),
        eq(evidenceSummaries.conditionSlug, ""),
      ),
    );
  return Boolean(row);
}
