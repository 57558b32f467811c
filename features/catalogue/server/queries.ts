import "server-only";
import { asc, eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import type { Catalogue } from "../schemas";

const { speciesGroups, species, agents, stockForms, conditions } = schema;

/** The visible catalogue, in display order. */
export async function getCatalogue(): Promise<Catalogue> {
  const db = await getDb();
  const groups = await db
    .select()
    .from(speciesGroups)
    .where(eq(speciesGroups.hidden, false))
    .orderBy(asc(speciesGroups.sortOrder), asc(speciesGroups.name));
  const sp = await db.select().from(species).where(eq(species.hidden, false)).orderBy(asc(species.commonName));
  const ag = await db
    .select()
    .from(agents)
    .where(eq(agents.hidden, false))
    .orderBy(asc(agents.sortOrder), asc(agents.name));
  const st = await db
    .select()
    .from(stockForms)
    .where(eq(stockForms.hidden, false))
    .orderBy(asc(stockForms.sortOrder), asc(stockForms.percent));
  const co = await db
    .select()
    .from(conditions)
    .where(eq(conditions.hidden, false))
    .orderBy(asc(conditions.sortOrder), asc(conditions.name));
  return {
    speciesGroups: groups.map((g) => ({ slug: g.slug, name: g.name, description: g.description })),
    species: sp.map((s) => ({
      id: s.id,
      scientificName: s.scientificName,
      commonName: s.commonName,
      groupSlug: s.groupSlug,
    })),
    agents: ag.map((a) => ({
      slug: a.slug,
      name: a.name,
      unit: a.unit === "g/L" ? "g/L" : "mg/L",
      bandEdges: a.bandEdges,
      plausibleCeiling: a.plausibleCeiling,
      redoseHours: a.redoseHours,
      watchDays: a.watchDays,
      description: a.description,
      stockForms: st
        .filter((s) => s.agentSlug === a.slug)
        .map((s) => ({
          id: s.id,
          label: s.label,
          percent: s.percent,
          basis: s.basis,
          densityGPerMl: s.densityGPerMl,
          activeFraction: s.activeFraction,
          compound: s.compound,
        })),
    })),
    conditions: co.map((c) => ({ slug: c.slug, name: c.name })),
  };
}
