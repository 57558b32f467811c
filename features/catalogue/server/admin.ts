import "server-only";
import { count, desc, eq } from "drizzle-orm";
import type { PgColumn, PgTable } from "drizzle-orm/pg-core";
import type { z } from "zod";
import { getDb, schema, type Db } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import { enqueueEvidenceRecomputeWhere, wakeEvidenceWorker } from "@/features/shared/server/evidence-outbox";
import type { Actor } from "@/features/shared/roles";
import { canManageCatalogue, type Caller } from "@/features/shared/policies";
import { catalogueInputs, type CatalogueKind } from "../admin-schemas";
import { speciesIdOf } from "./seed";

const { speciesGroups, species, agents, conditions, stockForms, reports, catalogueChanges } = schema;

function assertAdmin(actor: Actor | null): asserts actor is Actor {
  if (!actor) throw new AppError("unauthenticated", "Sign in to manage the catalogue.");
  if (!canManageCatalogue(actor))
    throw new AppError("forbidden", "Only club officers (admins) may change the catalogue.");
}

type Fields = Record<string, unknown>;
/**
 * Drizzle's builders take one table type, not a union of five; each kind's values were checked by its own
 * schema in catalogueInputs, so the table is handled as a plain PgTable here.
 */
const tables: Record<
  CatalogueKind,
  { table: PgTable; key: PgColumn; keyOf: (v: Fields) => string; used: PgColumn | null }
> = {
  groups: {
    table: speciesGroups,
    key: speciesGroups.slug,
    keyOf: (v: Fields) => String(v.slug),
    used: reports.groupSlug,
  },
  species: {
    table: species,
    key: species.id,
    keyOf: (v: Fields) => speciesIdOf(String(v.scientificName)),
    used: reports.speciesId,
  },
  agents: { table: agents, key: agents.slug, keyOf: (v: Fields) => String(v.slug), used: reports.agentSlug },
  conditions: {
    table: conditions,
    key: conditions.slug,
    keyOf: (v: Fields) => String(v.slug),
    used: reports.conditionSlug,
  },
  "stock-forms": { table: stockForms, key: stockForms.id, keyOf: (v: Fields) => String(v.id), used: null },
};

/** Every entry of a kind, hidden ones too, with how many reports use it. */
export async function listCatalogue(actor: Actor | null, kind: CatalogueKind) {
  assertAdmin(actor);
  const db = await getDb();
  const t = tables[kind];
  const rows = (await db.select().from(t.table)) as Record<string, unknown>[];
  const usage = new Map<string, number>();
  if (t.used) {
    const u = await db.select({ k: t.used, n: count() }).from(reports).groupBy(t.used);
    for (const x of u) if (x.k) usage.set(String(x.k), x.n);
  }
  const keyName = kind === "species" || kind === "stock-forms" ? "id" : "slug";
  return { items: rows.map((r) => ({ ...r, key: String(r[keyName]), inUse: usage.get(String(r[keyName])) ?? 0 })) };
}

async function record(
  actorId: string,
  entity: string,
  key: string,
  action: string,
  before: unknown,
  after: unknown,
  tx?: Pick<Db, "insert">,
) {
  const db = tx ?? (await getDb());
  await db
    .insert(catalogueChanges)
    .values({ actorId, entity, entityKey: key, action, before: before ?? null, after: after ?? null });
}

async function checkRefs(kind: CatalogueKind, v: Record<string, unknown>) {
  const db = await getDb();
  if (kind === "species") {
    const [g] = await db
      .select()
      .from(speciesGroups)
      .where(eq(speciesGroups.slug, String(v.groupSlug)));
    if (!g)
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        { path: "groupSlug", message: `No species group "${v.groupSlug}".` },
      ]);
  }
  if (kind === "stock-forms") {
    const [a] = await db
      .select()
      .from(agents)
      .where(eq(agents.slug, String(v.agentSlug)));
    if (!a)
      throw new AppError("invalid", "Some fields need fixing; see issues.", [
        { path: "agentSlug", message: `No agent "${v.agentSlug}".` },
      ]);
  }
}

export async function createCatalogueEntry<K extends CatalogueKind>(
  actor: Actor | null,
  kind: K,
  input: z.infer<(typeof catalogueInputs)[K]>,
) {
  assertAdmin(actor);
  const db = await getDb();
  const t = tables[kind];
  const key = t.keyOf(input as Fields);
  await checkRefs(kind, input as Record<string, unknown>);
  const [existing] = await db.select().from(t.table).where(eq(t.key, key));
  if (existing) throw new AppError("conflict", `There is already an entry "${key}"; edit it instead.`);
  const values = kind === "species" ? { ...input, id: key } : input;
  await db.transaction(async (tx) => {
    await tx.insert(t.table).values(values);
    await record(actor.id, kind, key, "create", null, values, tx);
    // A new preset: the agent's summaries are recomputed with the change (as every stock-form change).
    if (kind === "stock-forms")
      await enqueueEvidenceRecomputeWhere(tx, { agentSlugs: [String((input as Record<string, unknown>).agentSlug)] });
  });
  if (kind === "stock-forms") wakeEvidenceWorker();
  return { key };
}

export async function updateCatalogueEntry<K extends CatalogueKind>(
  actor: Actor | null,
  kind: K,
  key: string,
  patch: Partial<z.infer<(typeof catalogueInputs)[K]>>,
) {
  assertAdmin(actor);
  const db = await getDb();
  const t = tables[kind];
  const [before] = (await db.select().from(t.table).where(eq(t.key, key))) as Record<string, unknown>[];
  if (!before) throw notFound("That catalogue entry");
  const { slug: _s, id: _i, scientificName: _n, ...changes } = patch as Record<string, unknown>;
  if (Object.keys(changes).length === 0)
    throw new AppError("invalid", "Nothing to change.", [
      {
        path: "(body)",
        message: "Send at least one field to change (keys cannot change; add a new entry and merge instead).",
      },
    ]);
  await checkRefs(kind, { ...before, ...changes });
  const movedGroup = kind === "species" && changes.groupSlug && changes.groupSlug !== before.groupSlug;
  // What the stored summaries show: a group's name and visibility, an agent's band edges, a species' group.
  const stale =
    kind === "groups"
      ? { groupSlugs: [key] }
      : kind === "agents"
        ? { agentSlugs: [key] }
        : kind === "stock-forms"
          ? { agentSlugs: [...new Set([String(before.agentSlug), String(changes.agentSlug ?? before.agentSlug)])] }
          : movedGroup
            ? { groupSlugs: [String(before.groupSlug), String(changes.groupSlug)] }
            : null;
  await db.transaction(async (tx) => {
    await tx.update(t.table).set(changes).where(eq(t.key, key));
    await record(actor.id, kind, key, "update", before, changes, tx);
    if (movedGroup)
      await tx
        .update(reports)
        .set({ groupSlug: String(changes.groupSlug) })
        .where(eq(reports.speciesId, key));
    if (stale) await enqueueEvidenceRecomputeWhere(tx, stale);
  });
  if (stale) wakeEvidenceWorker();
  return { key, previous: before };
}

/** A catalogue entry in use cannot be deleted: hide it, or merge a species into another. */
export async function deleteCatalogueEntry(actor: Actor | null, kind: CatalogueKind, key: string) {
  assertAdmin(actor);
  const db = await getDb();
  const t = tables[kind];
  const [before] = await db.select().from(t.table).where(eq(t.key, key));
  if (!before) throw notFound("That catalogue entry");
  if (t.used) {
    const [u] = await db.select({ n: count() }).from(reports).where(eq(t.used, key));
    if ((u?.n ?? 0) > 0)
      throw new AppError(
        "conflict",
        `${u!.n} report${u!.n === 1 ? " uses" : "s use"} "${key}", so it cannot be deleted. Hide it instead${kind === "species" ? ", or merge it into another species" : ""}.`,
      );
  }
  if (kind === "groups") {
    const [s] = await db.select({ n: count() }).from(species).where(eq(species.groupSlug, key));
    if ((s?.n ?? 0) > 0)
      throw new AppError("conflict", `${s!.n} species belong to this group; move them first, or hide the group.`);
  }
  if (kind === "agents") {
    await db.delete(stockForms).where(eq(stockForms.agentSlug, key));
  }
  await db.delete(t.table).where(eq(t.key, key));
  await record(actor.id, kind, key, "delete", before, null);
  return { key, deleted: true };
}

/** Merges species `key` into `into`: its reports move, it is hidden and points at the other. */
export async function mergeSpecies(actor: Actor | null, key: string, into: string, note: string) {
  assertAdmin(actor);
  if (key === into)
    throw new AppError("invalid", "Choose another species to merge into.", [
      { path: "into", message: "A species cannot be merged into itself." },
    ]);
  const db = await getDb();
  const [from] = await db.select().from(species).where(eq(species.id, key));
  const [to] = await db.select().from(species).where(eq(species.id, into));
  if (!from) throw notFound("That species");
  if (!to)
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      { path: "into", message: `No species "${into}".` },
    ]);
  const touched = await db.transaction(async (tx) => {
    const moved = await tx
      .update(reports)
      .set({ speciesId: to.id, groupSlug: to.groupSlug })
      .where(eq(reports.speciesId, key))
      .returning({ agentSlug: reports.agentSlug });
    await tx.update(species).set({ hidden: true, mergedInto: to.id }).where(eq(species.id, key));
    await tx.insert(catalogueChanges).values({
      actorId: actor.id,
      entity: "species",
      entityKey: key,
      action: "merge",
      before: from,
      after: { mergedInto: to.id, note, reportsMoved: moved.length },
    });
    await enqueueEvidenceRecomputeWhere(tx, { groupSlugs: [...new Set([from.groupSlug, to.groupSlug])] });
    return moved;
  });
  wakeEvidenceWorker();
  return { key, into, reportsMoved: touched.length, groups: [...new Set([from.groupSlug, to.groupSlug])] };
}

/** The catalogue- and settings-change log, newest first, for admins. */
export async function getCatalogueChanges({ actor }: Caller, limit = 30) {
  assertAdmin(actor);
  const db = await getDb();
  const rows = await db
    .select({
      id: catalogueChanges.id,
      entity: catalogueChanges.entity,
      entityKey: catalogueChanges.entityKey,
      action: catalogueChanges.action,
      at: catalogueChanges.at,
      actorName: schema.users.name,
    })
    .from(catalogueChanges)
    .leftJoin(schema.users, eq(schema.users.id, catalogueChanges.actorId))
    .orderBy(desc(catalogueChanges.id))
    .limit(limit);
  return rows.map((r) => ({ ...r, at: r.at.toISOString() }));
}
