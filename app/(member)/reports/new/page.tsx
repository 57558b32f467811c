import { Cautions } from "@/features/shared/components/cautions";
import { PageTitle } from "@/features/shared/components/ui";
import { ReportWizard } from "@/features/reports/components/report-wizard";
import { wizardCatalogue } from "../_wizard-catalogue";

export const metadata = { title: "Report a treatment" };

const prefillKeys = ["agentSlug", "stockFormId", "stockPercent", "stockBasis", "volume", "volumeUnit", "amountMl", "intervalHours"] as const;

export default async function NewReportPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const sp = await searchParams;
  const course = sp.course;
  const prefill = Object.fromEntries(prefillKeys.filter((k) => sp[k]).map((k) => [k, String(sp[k]).slice(0, 40)]));
  return (
    <div className="grid gap-6">
      <PageTitle lead={course ? "Start with what you know now; log each dose as you give it and finish the outcome when the course is over." : "Five short steps. Each is saved as a draft; nothing is shared until you submit it and a moderator accepts it."}>
        {course ? "Start a course log" : "Report a treatment"}
      </PageTitle>
      <ReportWizard catalogue={await wizardCatalogue()} report={null} step={0} course={Boolean(course)} prefill={prefill} />
      <Cautions compact />
    </div>
  );
}
