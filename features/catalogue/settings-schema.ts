import { z } from "zod";

export const clubSettingsSchema = z.object({
  name: z.string().trim().min(2, "The club's name needs at least 2 characters.").max(120, "The club's name is at most 120 characters."),
  confidenceLevel: z.coerce.number().refine((v) => [80, 90, 95, 99].includes(v), "Confidence level must be 80, 90, 95 or 99 %."),
  minReports: z.coerce.number({ error: "Minimum reports must be a whole number." }).int("Minimum reports must be a whole number.").min(1, "Minimum reports is at least 1.").max(1000, "Minimum reports is at most 1000."),
  defaultVolumeUnit: z.enum(["L", "gal_us", "gal_imp"], { error: "Default volume unit must be L, gal_us or gal_imp." }),
  defaultTemperatureUnit: z.enum(["C", "F"], { error: "Default temperature unit must be C or F." }),
  // A form's checkbox sends "on" or nothing; the API sends true or false.
  nightlyBackup: z.preprocess(
    (v) => (v === "on" || v === "true" ? true : v === undefined || v === "false" || v === "off" ? false : v),
    z.boolean({ error: "nightlyBackup must be true or false." }),
  ),
});
export type ClubSettingsInput = z.infer<typeof clubSettingsSchema>;

/** PATCH /api/admin/settings: any of the settings, at least one, and no unknown names (a typo must not pass silently). */
export const clubSettingsPatchSchema = clubSettingsSchema
  .partial()
  .strict()
  .refine((v) => Object.values(v).some((x) => x !== undefined), "Send at least one setting to change.");
export type ClubSettingsPatch = z.infer<typeof clubSettingsPatchSchema>;
