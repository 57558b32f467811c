import "server-only";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import { starterAgents, starterConditions, starterGroups, starterSpecies } from "../starter-data";

/** Species ids are stable slugs of the scientific name, so seeding twice changes nothing. */
export const speciesIdOf = (scientificName: string) => scientificName.toLowerCase().replace(/[^a-z0-9]+/g, "-");

/** Inserts the starter catalogue where absent; never overwrites an admin's edits. */
export async function seedCatalogue(db: Db): Promise<void> {
  const { speciesGroups, species, agents, stockForms, conditions } = schema;
  await db.transaction(async (tx) => {
    await tx
      .insert(speciesGroups)
      .values(starterGroups.map((g, i) => ({ ...g, sortOrder: i })))
      .onConflictDoNothing();
    await tx
      .insert(species)
      .values(
        starterSpecies.map((s) => ({
          id: speciesIdOf(s.scientificName),
          scientificName: s.scientificName,
          commonName: s.commonName,
          groupSlug: s.group,
        })),
      )
      .onConflictDoNothing();
    await tx
      .insert(agents)
      .values(starterAgents.map(({ stocks: _stocks, ...a }, i) => ({ ...a, sortOrder: i })))
      .onConflictDoNothing();
    await tx
      .insert(stockForms)
      .values(
        starterAgents.flatMap((a) =>
          a.stocks.map((s, i) => ({ ...s, activeFraction: s.activeFraction ?? 1, agentSlug: a.slug, sortOrder: i })),
        ),
      )
      .onConflictDoNothing();
    await tx
      .insert(conditions)
      .values(starterConditions.map((c, i) => ({ ...c, sortOrder: i })))
      .onConflictDoNothing();
    await tx.insert(schema.clubSettings).values({ id: 1 }).onConflictDoNothing();
  });
}
