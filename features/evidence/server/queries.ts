import "server-only";
import { asc, eq } from "drizzle-orm";
import { cache } from "react";
import { getDb, schema } from "@/db/client";
import { getCatalogue, getClubSettings } from "@/features/catalogue/server";
import { AppError, notFound, type ErrorCode, type FieldIssue } from "@/features/shared/errors";
import { wilson } from "../stats";
import { fitDoseResponse } from "../dose-response";
import { ANECDOTAL_TEXT, METHOD_VERSION, type Summary, type SummaryDetail } from "../summary";
import { getPointsAndSpecies, getStoredSummaries, getStoredSummary, isPairStored } from "./compute";

const { agents, speciesGroups, conditions } = schema;

function emptySummary(group: { slug: string; name: string }, edges: number[], level: number): SummaryDetail {
  const none = wilson(0, 0, level);
  return {
    group,
    reports: 0,
    members: 0,
    fish: 0,
    tolerated: 0,
    toleratedShare: none,
    toleratedDose: {
      min: null,
      p10: null,
      p25: null,
      median: null,
      p75: null,
      p90: null,
      max: null,
      medianInterval: null,
    },
    lowestAdverseDose: null,
    sparse: true,
    doseResponse: fitDoseResponse([], level),
    bands: edges.slice(0, -1).map((from, i) => ({
      from,
      to: edges[i + 1]!,
      reports: 0,
      tolerated: 0,
      toleratedShare: none,
      cleared: 0,
      clearedShare: none,
    })),
    points: [],
    pointBins: [],
    species: [],
  };
}

async function agentOrError(slug: string) {
  const db = await getDb();
  const [agent] = await db.select().from(agents).where(eq(agents.slug, slug));
  if (!agent)
    throw new AppError("invalid", "Unknown agent; see /api/catalogue for the agents.", [
      { path: "agent", message: `No agent "${slug}" in the catalogue.` },
    ]);
  return agent;
}

async function conditionOrError(slug: string | undefined) {
  if (!slug) return "";
  const db = await getDb();
  const [c] = await db.select({ slug: conditions.slug }).from(conditions).where(eq(conditions.slug, slug));
  if (!c)
    throw new AppError("invalid", "Unknown condition; see /api/catalogue.", [
      { path: "condition", message: `No condition "${slug}" in the catalogue.` },
    ]);
  return c.slug;
}

const strip = ({ bands: _b, points: _p, pointBins: _pb, species: _s, ...summary }: SummaryDetail): Summary => summary;

import { evidenceCacheVersion, tagEvidence } from "./cache";

/** The version read once per request (React's per-render memo; a route handler reads it once per call anyway). */
const versionForRequest = cache(evidenceCacheVersion);

/**
 * A cached read's outcome. An AppError (unknown agent, condition or group) is kept as data, so it is cached with the
 * version like an answer and thrown again, as the same AppError, outside the cache.
 */
type Outcome<T> =
  { ok: true; value: T } | { ok: false; error: { code: ErrorCode; message: string; issues: FieldIssue[] | null } };

async function capture<T>(load: () => Promise<T>): Promise<Outcome<T>> {
  try {
    return { ok: true, value: await load() };
  } catch (err) {
    if (err instanceof AppError)
      return { ok: false, error: { code: err.code, message: err.message, issues: err.issues ?? null } };
    throw err;
  }
}

function unwrap<T>(o: Outcome<T>): T {
  if (o.ok) return o.value;
  throw new AppError(o.error.code, o.error.message, o.error.issues ?? undefined);
}

// The cached reads: `_version` is not used inside, it is part of the cache key (see cache.ts).

async function cachedSummaries(_version: string, agentSlug: string, conditionSlug: string) {
  "use cache";
  tagEvidence({ agent: agentSlug });
  return capture(() => loadSummaries(agentSlug, conditionSlug || undefined));
}

async function cachedSummaryDetail(_version: string, groupSlug: string, agentSlug: string, conditionSlug: string) {
  "use cache";
  tagEvidence({ agent: agentSlug, group: groupSlug });
  return capture(() => loadSummaryDetail(groupSlug, agentSlug, conditionSlug || undefined));
}

async function cachedCatalogue(_version: string) {
  "use cache";
  tagEvidence({});
  return getCatalogue();
}

type SummaryList = Awaited<ReturnType<typeof loadSummaries>>;

/** Every visible group's summary for an agent (and condition): from the framework's cache while nothing changed. */
export async function getSummaries(agentSlug: string, conditionSlug?: string): Promise<SummaryList> {
  return unwrap(await cachedSummaries(await versionForRequest(), agentSlug, conditionSlug ?? ""));
}

/** One group's summary with its bands, points and species: from the framework's cache while nothing changed. */
export async function getSummaryDetail(
  groupSlug: string,
  agentSlug: string,
  conditionSlug?: string,
): Promise<Awaited<ReturnType<typeof loadSummaryDetail>>> {
  return unwrap(await cachedSummaryDetail(await versionForRequest(), groupSlug, agentSlug, conditionSlug ?? ""));
}

/** The visible catalogue, for the public evidence pages' choices: cached with the evidence. */
export async function getEvidenceCatalogue() {
  return cachedCatalogue(await versionForRequest());
}

/** Stored summaries for every visible group (groups without reports appear with zero counts). */
async function loadSummaries(agentSlug: string, conditionSlug?: string) {
  const [agent, cond, settings] = await Promise.all([
    agentOrError(agentSlug),
    conditionOrError(conditionSlug),
    getClubSettings(),
  ]);
  const db = await getDb();
  const [groups, stored] = await Promise.all([
    db
      .select({ slug: speciesGroups.slug, name: speciesGroups.name })
      .from(speciesGroups)
      .where(eq(speciesGroups.hidden, false))
      .orderBy(asc(speciesGroups.sortOrder), asc(speciesGroups.name)),
    getStoredSummaries(agent.slug, cond),
  ]);
  const byGroup = new Map(stored.map((s) => [s.groupSlug, s.summary as Summary]));
  const edges = [...agent.bandEdges].sort((a, b) => a - b);
  return {
    agent: agent.slug,
    agentName: agent.name,
    unit: agent.unit,
    condition: cond || null,
    confidenceLevel: settings.confidenceLevel,
    minReports: settings.minReports,
    anecdotal: true as const,
    notice: ANECDOTAL_TEXT,
    methodVersion: METHOD_VERSION,
    groups: groups.map((g) => ({
      ...(byGroup.get(g.slug) ?? strip(emptySummary(g, edges, settings.confidenceLevel))),
      group: g,
    })),
  };
}

async function loadSummaryDetail(groupSlug: string, agentSlug: string, conditionSlug?: string) {
  const [agent, cond, settings] = await Promise.all([
    agentOrError(agentSlug),
    conditionOrError(conditionSlug),
    getClubSettings(),
  ]);
  const db = await getDb();
  const [group] = await db
    .select({ slug: speciesGroups.slug, name: speciesGroups.name })
    .from(speciesGroups)
    .where(eq(speciesGroups.slug, groupSlug));
  if (!group) throw notFound("That species group");
  const stored = await getStoredSummary(groupSlug, agent.slug, cond);
  // The chart and species are stored with the figures: no report is read here. Live from the reports only where the
  // pair was never recomputed (a fresh database) or its rows predate the stored chart; a condition missing from a
  // recomputed pair had no reports, and shows empty like its summary.
  const extra =
    stored?.chart ??
    (!stored && (await isPairStored(groupSlug, agent.slug))
      ? { points: [], pointBins: [], species: [] }
      : await getPointsAndSpecies(groupSlug, agent.slug, cond));
  const edges = [...agent.bandEdges].sort((a, b) => a - b);
  const data = { ...(stored?.summary ?? emptySummary(group, edges, settings.confidenceLevel)), ...extra };
  return {
    agent: agent.slug,
    agentName: agent.name,
    unit: agent.unit,
    condition: cond || null,
    confidenceLevel: settings.confidenceLevel,
    minReports: settings.minReports,
    anecdotal: true as const,
    notice: ANECDOTAL_TEXT,
    methodVersion: METHOD_VERSION,
    redoseHours: agent.redoseHours,
    ...data,
    group,
  };
}
