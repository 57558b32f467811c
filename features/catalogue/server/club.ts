import { eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";

export interface ClubSettings {
  name: string;
  confidenceLevel: 80 | 90 | 95 | 99;
  minReports: number;
  defaultVolumeUnit: string;
  defaultTemperatureUnit: string;
  /** ½ or ⅓: the share of a group's usual dose offered as a first dose. */
  firstDoseFraction: number;
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
    firstDoseFraction: row?.firstDoseFraction ?? 0.5,
  };
}

/** An admin changes the club's settings; the change is recorded with before and after. */
export async function updateClubSettings(actorId: string, input: import("../settings-schema").ClubSettingsInput): Promise<ClubSettings> {
  const db = await getDb();
  const before = await getClubSettings();
  await db.transaction(async (tx) => {
    await tx.insert(schema.clubSettings).values({ id: 1 }).onConflictDoNothing();
    await tx.update(schema.clubSettings).set({ ...input, updatedAt: new Date() }).where(eq(schema.clubSettings.id, 1));
    await tx.insert(schema.catalogueChanges).values({ actorId, entity: "club_settings", entityKey: "1", action: "update", before, after: input });
  });
  return getClubSettings();
}

/** Whether this club holds invented demo accounts (the demo seed), so every page can say so. */
export async function hasDemoData(): Promise<boolean> {
  const db = await getDb();
  const [row] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.isDemo, true)).limit(1);
  return Boolean(row);
}
