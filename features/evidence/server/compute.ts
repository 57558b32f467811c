import { and, eq, sql } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { getClubSettings } from "@/features/catalogue/server";
import { medianRank, wilson } from "../stats";
import { METHOD_VERSION, type Band, type SummaryDetail } from "../summary";

const { evidenceSummaries, agents, speciesGroups } = schema;

interface Row {
  c: string;
  reports: number;
  members: number;
  fish: number;
  tolerated: number;
  q: number[] | null;
  lowest_adverse: number | null;
  doses: number[] | null;
  bands: [number, number, number, number][] | null;
  points: [number, boolean, boolean][] | null;
  species: [string | null, string, string | null, number][] | null;
}

const rowsOf = <T,>(r: unknown) => (r as { rows: T[] }).rows;
const toNum = (x: unknown) => (x === null || x === undefined ? null : Number(x));
const nums = (xs: unknown): number[] | null => (xs == null ? null : (typeof xs === "string" ? JSON.parse(xs.replace(/^\{/, "[").replace(/\}$/, "]")) : (xs as unknown[])).map(Number));

/**
 * The whole summary of one group × agent, for every condition at once ("" = all conditions), in one
 * SQL statement: counts, type-7 quantiles (percentile_cont), the lowest adverse dose, band counts,
 * the sorted tolerated doses (for the median interval's order statistics), the points and species.
 */
export function summarySql(groupSlug: string, agentSlug: string, edges: number[]) {
  const edgeArray = sql.raw(`array[${edges.map((e) => Number(e)).join(",")}]::float8[]`);
  return sql`
    with base as (
      select r.author_id, r.fish_count, r.concentration as dose, r.species_id, r.species_other,
             coalesce(r.condition_slug, '') as cond,
             (not (coalesce(r.fish_lost, 0) > 0 and coalesce(r.loss_cause, 'unknown') in ('treatment', 'unknown')) and coalesce(r.distress, 'none') <> 'severe') as tol,
             r.condition_outcome = 'cleared' as clr
        from reports r
       where r.status = 'accepted' and r.group_slug = ${groupSlug} and r.agent_slug = ${agentSlug} and r.concentration is not null
    ),
    expanded as (
      select '' as c, b.* from base b
      union all
      select b.cond as c, b.* from base b where b.cond <> ''
    ),
    bands as (
      select c, width_bucket(dose, ${edgeArray}) as bucket, count(*)::int as n,
             count(*) filter (where tol)::int as t, count(*) filter (where clr)::int as cl
        from expanded group by c, bucket
    ),
    sp as (
      select b.species_id, coalesce(s.common_name, b.species_other, '?') as common_name, s.scientific_name, count(*)::int as n
        from base b left join species s on s.id = b.species_id
       group by b.species_id, coalesce(s.common_name, b.species_other, '?'), s.scientific_name
    )
    select e.c,
           count(*)::int as reports,
           count(distinct e.author_id)::int as members,
           coalesce(sum(e.fish_count), 0)::int as fish,
           count(*) filter (where e.tol)::int as tolerated,
           percentile_cont(array[0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]::float8[]) within group (order by e.dose) filter (where e.tol) as q,
           min(e.dose) filter (where not e.tol) as lowest_adverse,
           array_agg(e.dose order by e.dose) filter (where e.tol) as doses,
           (select json_agg(json_build_array(bucket, n, t, cl) order by bucket) from bands where bands.c = e.c) as bands,
           case when e.c = '' then json_agg(json_build_array(e.dose, e.tol, e.clr) order by e.dose, e.tol, e.clr) end as points,
           case when e.c = '' then (select json_agg(json_build_array(species_id, common_name, scientific_name, n) order by n desc, common_name) from sp) end as species
      from expanded e
     group by e.c`;
}

function bandsFrom(edges: number[], counts: [number, number, number, number][] | null, level: number): Band[] {
  const byBucket = new Map((counts ?? []).map(([b, n, t, cl]) => [Number(b), { n: Number(n), t: Number(t), cl: Number(cl) }]));
  const out: Band[] = [];
  // width_bucket: i for edges[i-1] <= x < edges[i]; edges.length for x >= the last edge.
  for (let i = 1; i <= edges.length; i++) {
    const c = byBucket.get(i) ?? { n: 0, t: 0, cl: 0 };
    if (i === edges.length && c.n === 0) continue;
    out.push({
      from: edges[i - 1]!, to: i < edges.length ? edges[i]! : null, reports: c.n,
      tolerated: c.t, toleratedShare: wilson(c.t, c.n, level), cleared: c.cl, clearedShare: wilson(c.cl, c.n, level),
    });
  }
  return out;
}

export function summaryFromRow(row: Row, group: { slug: string; name: string }, edges: number[], level: number, minReports: number): SummaryDetail {
  const q = nums(row.q);
  const doses = nums(row.doses) ?? [];
  const nt = Number(row.tolerated);
  const rank = medianRank(nt, level);
  const pts = (typeof row.points === "string" ? JSON.parse(row.points) : row.points) as [number, boolean, boolean][] | null;
  const bandRows = (typeof row.bands === "string" ? JSON.parse(row.bands) : row.bands) as Row["bands"];
  const sp = (typeof row.species === "string" ? JSON.parse(row.species) : row.species) as Row["species"];
  return {
    group,
    reports: Number(row.reports),
    members: Number(row.members),
    fish: Number(row.fish),
    tolerated: nt,
    toleratedShare: wilson(nt, Number(row.reports), level),
    toleratedDose: {
      min: q ? q[0]! : null, p10: q ? q[1]! : null, p25: q ? q[2]! : null, median: q ? q[3]! : null, p75: q ? q[4]! : null, p90: q ? q[5]! : null, max: q ? q[6]! : null,
      medianInterval: rank ? { low: doses[rank.r - 1]!, high: doses[nt - rank.r]!, coverage: rank.coverage } : null,
    },
    lowestAdverseDose: toNum(row.lowest_adverse),
    sparse: Number(row.reports) < minReports,
    bands: bandsFrom(edges, bandRows, level),
    points: (pts ?? []).map(([dose, tolerated, cleared]) => ({ dose: Number(dose), tolerated: Boolean(tolerated), cleared: Boolean(cleared) })),
    species: (sp ?? []).map(([id, commonName, scientificName, n]) => ({ id, commonName, scientificName, reports: Number(n) })),
  };
}

/** Recomputes and stores one group × agent (all conditions); removes rows that no longer have reports. */
export async function recomputeGroupAgent(db: Db, groupSlug: string, agentSlug: string, settings?: { confidenceLevel: number; minReports: number }): Promise<number> {
  const s = settings ?? (await getClubSettings());
  const [agent] = await db.select({ bandEdges: agents.bandEdges }).from(agents).where(eq(agents.slug, agentSlug));
  const [group] = await db.select({ slug: speciesGroups.slug, name: speciesGroups.name }).from(speciesGroups).where(eq(speciesGroups.slug, groupSlug));
  if (!agent || !group) return 0;
  const edges = [...agent.bandEdges].sort((a, b) => a - b);
  const rows = rowsOf<Row>(await db.execute(summarySql(groupSlug, agentSlug, edges)));
  const values = rows.map((row) => ({
    groupSlug, agentSlug, conditionSlug: row.c, methodVersion: METHOD_VERSION, confidenceLevel: s.confidenceLevel, reports: Number(row.reports),
    data: summaryFromRow(row, group, edges, s.confidenceLevel, s.minReports), computedAt: new Date(),
  }));
  await db.transaction(async (tx) => {
    await tx.delete(evidenceSummaries).where(and(eq(evidenceSummaries.groupSlug, groupSlug), eq(evidenceSummaries.agentSlug, agentSlug)));
    if (values.length) await tx.insert(evidenceSummaries).values(values);
  });
  return values.length;
}

/** After an accept, retract, correction or import: recompute each touched group × agent once. */
export async function recomputeAfterChange(pairs: { groupSlug: string | null; agentSlug: string | null }[]): Promise<void> {
  const db = await getDb();
  const settings = await getClubSettings();
  const seen = new Set<string>();
  for (const p of pairs) {
    if (!p.groupSlug || !p.agentSlug) continue;
    const key = `${p.groupSlug}\u0000${p.agentSlug}`;
    if (seen.has(key)) continue;
    seen.add(key);
    await recomputeGroupAgent(db, p.groupSlug, p.agentSlug, settings);
  }
}

/** Everything (settings change, first start after seeding): every group × agent with accepted reports. */
export async function recomputeAll(db?: Db): Promise<number> {
  const d = db ?? (await getDb());
  const settings = await getClubSettings();
  const pairs = rowsOf<{ group_slug: string; agent_slug: string }>(
    await d.execute(sql`select distinct group_slug, agent_slug from reports where status = 'accepted' and group_slug is not null and agent_slug is not null
                        union select distinct group_slug, agent_slug from evidence_summaries`),
  );
  let n = 0;
  for (const p of pairs) n += await recomputeGroupAgent(d, p.group_slug, p.agent_slug, settings);
  return n;
}

export async function getStoredSummaries(agentSlug: string, conditionSlug: string) {
  const db = await getDb();
  return db
    .select({ groupSlug: evidenceSummaries.groupSlug, data: evidenceSummaries.data, confidenceLevel: evidenceSummaries.confidenceLevel, methodVersion: evidenceSummaries.methodVersion })
    .from(evidenceSummaries)
    .where(and(eq(evidenceSummaries.agentSlug, agentSlug), eq(evidenceSummaries.conditionSlug, conditionSlug)));
}

