import "server-only";
import { eq } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import type { Actor } from "@/features/shared/roles";
import { authorize, canEditClubSettings, type Caller } from "@/features/shared/policies";
import { enqueueEvidenceRecomputeWhere, wakeEvidenceWorker } from "@/features/shared/server/evidence-outbox";
import type { ClubSettingsPatch } from "../settings-schema";

export interface ClubSettings {
  name: string;
  confidenceLevel: 80 | 90 | 95 | 99;
  minReports: number;
  defaultVolumeUnit: string;
  defaultTemperatureUnit: string;
  /** ½ or ⅓: the share of a group's usual dose offered as a first dose. */
  firstDoseFraction: number;
}

/**
 * Public: the club's name and the figures every summary states (level, minimum, units).
 * `q`: an open transaction to read through (the evidence worker reads settings with the figures it replaces).
 */
export async function getClubSettings(q?: Pick<Db, "select">): Promise<ClubSettings> {
  const db = q ?? (await getDb());
  const [row] = await db.select().from(schema.clubSettings).where(eq(schema.clubSettings.id, 1));
  return {
    name: row?.name ?? "Tanklore club",
    confidenceLevel: (row?.confidenceLevel ?? 95) as ClubSettings["confidenceLevel"],
    minReports: row?.minReports ?? 5,
    defaultVolumeUnit: row?.defaultVolumeUnit ?? "L",
    defaultTemperatureUnit: row?.defaultTemperatureUnit ?? "C",
    firstDoseFraction: row?.firstDoseFraction ?? 0.5,
  };
}

/** What only officers see: the nightly backup's switch and when it last ran. */
export interface ClubSettingsForEdit extends ClubSettings {
  nightlyBackup: boolean;
  lastNightlyBackupAt: Date | null;
}

async function readForEdit(): Promise<ClubSettingsForEdit> {
  const db = await getDb();
  const [row] = await db
    .select({
      nightlyBackup: schema.clubSettings.nightlyBackup,
      lastNightlyBackupAt: schema.clubSettings.lastNightlyBackupAt,
    })
    .from(schema.clubSettings)
    .where(eq(schema.clubSettings.id, 1));
  return {
    ...(await getClubSettings()),
    nightlyBackup: row?.nightlyBackup ?? false,
    lastNightlyBackupAt: row?.lastNightlyBackupAt ?? null,
  };
}

/** The settings form's data, for admins. */
export async function getClubSettingsForEdit({ actor }: Caller): Promise<ClubSettingsForEdit> {
  authorize(actor, canEditClubSettings, "change the club's settings");
  return readForEdit();
}

/** An admin changes any of the club's settings (the form sends all, PATCH some); the change is recorded with before and after. */
export async function updateClubSettings(actor: Actor | null, input: ClubSettingsPatch): Promise<ClubSettingsForEdit> {
  authorize(actor, canEditClubSettings, "change the club's settings");
  const actorId = actor.id;
  const db = await getDb();
  const { lastNightlyBackupAt: _, ...before } = await readForEdit();
  // The confidence level and the minimum shape every summary; the name and default units none.
  const movesFigures =
    (input.confidenceLevel !== undefined && input.confidenceLevel !== before.confidenceLevel) ||
    (input.minReports !== undefined && input.minReports !== before.minReports);
  await db.transaction(async (tx) => {
    await tx.insert(schema.clubSettings).values({ id: 1 }).onConflictDoNothing();
    await tx
      .update(schema.clubSettings)
      .set({ ...input, updatedAt: new Date() })
      .where(eq(schema.clubSettings.id, 1));
    await tx
      .insert(schema.catalogueChanges)
      .values({ actorId, entity: "club_settings", entityKey: "1", action: "update", before, after: input });
    if (movesFigures) await enqueueEvidenceRecomputeWhere(tx);
  });
  if (movesFigures) wakeEvidenceWorker();
  return readForEdit();
}

/** Public: whether this club holds invented demo accounts (the demo seed), so every page can say so. */
export async function hasDemoData(): Promise<boolean> {
  const db = await getDb();
  const [row] = await db
    .select({ id: schema.users.id })
    .from(schema.users)
    .where(eq(schema.users.isDemo, true))
    .limit(1);
  return Boolean(row);
}
