import { z } from "zod";

const CONFIDENCE = "Confidence level must be 80, 90, 95 or 99 %.";
const MIN_REPORTS = "Minimum reports must be a whole number.";
const FIRST_SHARE = "The first-dose share must be ½ (0.5) or ⅓ (0.3333).";
// The rules on numbers; the form reads its text into numbers first, JSON must send numbers.
const confidenceLevel = z.number({ error: CONFIDENCE }).refine((v) => [80, 90, 95, 99].includes(v), CONFIDENCE);
const minReports = z
  .number({ error: MIN_REPORTS })
  .int(MIN_REPORTS)
  .min(1, "Minimum reports is at least 1.")
  .max(1000, "Minimum reports is at most 1000.");
const firstDoseFraction = z
  .number({ error: FIRST_SHARE })
  .refine((v) => v === 0.5 || Math.abs(v - 1 / 3) < 1e-4, FIRST_SHARE)
  .transform((v) => (v === 0.5 ? 0.5 : 1 / 3));

/** The settings form (a server action: every value arrives as text). */
export const clubSettingsSchema = z.object({
  name: z
    .string()
    .trim()
    .min(2, "The club's name needs at least 2 characters.")
    .max(120, "The club's name is at most 120 characters.")
    // The settings form posts to a server action, not through parseJson: refuse control characters here too.
    .regex(
      // eslint-disable-next-line no-control-regex -- matching control characters is the point
      /^[^\u0000-\u001F\u007F]*$/,
      "The club's name cannot hold control characters (tabs and line breaks included).",
    ),
  confidenceLevel: z.coerce.number({ error: CONFIDENCE }).pipe(confidenceLevel),
  minReports: z.coerce.number({ error: MIN_REPORTS }).pipe(minReports),
  defaultVolumeUnit: z.enum(["L", "gal_us", "gal_imp"], { error: "Default volume unit must be L, gal_us or gal_imp." }),
  defaultTemperatureUnit: z.enum(["C", "F"], { error: "Default temperature unit must be C or F." }),
  // No default here: PATCH takes this schema partially, and a default would reset ⅓ to ½ on any other change.
  firstDoseFraction: z.coerce.number({ error: FIRST_SHARE }).pipe(firstDoseFraction),
  // A form's checkbox sends "on" or nothing; the API sends true or false.
  nightlyBackup: z.preprocess(
    (v) => (v === "on" || v === "true" ? true : v === undefined || v === "false" || v === "off" ? false : v),
    z.boolean({ error: "nightlyBackup must be true or false." }),
  ),
});
export type ClubSettingsInput = z.infer<typeof clubSettingsSchema>;

/** PATCH /api/admin/settings: any of the settings, at least one, and no unknown names (a typo must not pass silently). */
export const clubSettingsPatchSchema = clubSettingsSchema
  .extend({
    confidenceLevel,
    minReports,
    firstDoseFraction,
    nightlyBackup: z.boolean({ error: "nightlyBackup must be true or false." }),
  })
  .partial()
  .strict()
  .refine((v) => Object.values(v).some((x) => x !== undefined), "Send at least one setting to change.");
export type ClubSettingsPatch = z.infer<typeof clubSettingsPatchSchema>;
