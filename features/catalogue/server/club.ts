import { eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import type { ClubSettingsPatch } from "../settings-schema";

export interface ClubSettings {
  name: string;
  confidenceLevel: 80 | 90 | 95 | 99;
  minReports: number;
  defaultVolumeUnit: string;
  defaultTemperatureUnit: string;
  nightlyBackup: boolean;
  lastNightlyBackupAt: Date | null;
}

export async function getClubSettings(): Promise<ClubSettings> {
  const db = await getDb();
  const [row] = await db.select().from(schema.clubSettings).where(eq(schema.clubSettings.id, 1));
  return {
    name: row?.name ?? "Tanklore club",
    confidenceLevel: (row?.confidenceLevel ?? 95) as ClubSettings["confidenceLevel"],
    minReports: row?.minReports ?? 5,
    defaultVolumeUnit: row?.defaultVolumeUnit ?? "L",
    defaultTemperatureUnit: row?.defaultTemperatureUnit ?? "C",
    nightlyBackup: row?.nightlyBackup ?? false,
    lastNightlyBackupAt: row?.lastNightlyBackupAt ?? null,
  };
}

/** An admin changes the club's settings; the change is recorded with before and after. */
export async function updateClubSettings(actorId: string, input: ClubSettingsPatch): Promise<ClubSettings> {
  const db = await getDb();
  const before = await getClubSettings();
  await db.transaction(async (tx) => {
    await tx.insert(schema.clubSettings).values({ id: 1 }).onConflictDoNothing();
    await tx.update(schema.clubSettings).set({ ...input, updatedAt: new Date() }).where(eq(schema.clubSettings.id, 1));
    await tx.insert(schema.catalogueChanges).values({ actorId, entity: "club_settings", entityKey: "1", action: "update", before, after: input });
  });
  return getClubSettings();
}

/** PATCH /api/admin/settings: admins only; the settings after the change. */
export async function changeClubSettings(actor: Actor | null, input: ClubSettingsPatch): Promise<ClubSettings> {
  if (!actor) throw new AppError("unauthenticated", "Sign in to change the club's settings.");
  if (actor.role !== "admin") throw new AppError("forbidden", "Only club officers (admins) may change the club's settings.");
  return updateClubSettings(actor.id, input);
}

/** Whether this club holds invented demo accounts (the demo seed), so every page can say so. */
export async function hasDemoData(): Promise<boolean> {
  const db = await getDb();
  const [row] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.isDemo, true)).limit(1);
  return Boolean(row);
}
