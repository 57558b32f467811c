import { getPageActor } from "@/features/members/server";
import { getReportFormCatalogue } from "@/features/reports/server";
import type { WizardCatalogue } from "@/features/reports/components/report-wizard";
import { pageData } from "@/features/shared/server/page";

/** The report form's choices, for the signed-in caller (401 for a visitor, whatever the layout does). */
export async function wizardCatalogue(): Promise<WizardCatalogue> {
  return pageData(getReportFormCatalogue({ actor: await getPageActor() }));
}
