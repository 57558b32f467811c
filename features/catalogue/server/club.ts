import { eq } from "drizzle-orm";
import { getDb, schema } from "@/db/client";

export interface ClubSettings {
  name: string;
  confidenceLevel: 80 | 90 | 95 | 99;
  minReports: number;
  defaultVolumeUnit: string;
  defaultTemperatureUnit: string;
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
  };
}
