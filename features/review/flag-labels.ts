/** Short names of the plausibility flags (features/reports/server/flags.ts); each flag's message says why in full. */
export const flagLabels: Record<string, string> = {
  stated_mismatch: "stated ≠ computed",
  above_ceiling: "above ceiling",
  outside_group_range: "outside group's range",
  temperature_unusual: "temperature",
  ph_unusual: "pH",
  species_not_listed: "species not listed",
  no_photos: "no photos",
  suspected_duplicate: "possible duplicate",
};
