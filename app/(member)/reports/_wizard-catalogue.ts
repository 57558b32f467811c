import { getCatalogue } from "@/features/catalogue/server";
import type { WizardCatalogue } from "@/features/reports/components/report-wizard";

export async function wizardCatalogue(): Promise<WizardCatalogue> {
  const c = await getCatalogue();
  return { species: c.species, conditions: c.conditions, agents: c.agents };
}
