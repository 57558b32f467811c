import { redirect } from "next/navigation";
import { getPageActor } from "@/features/members/server";
import { getReportById } from "@/features/reports/server";
import { ReportWizard } from "@/features/reports/components/report-wizard";
import { PhotoUploader } from "@/features/photos/components/photo-uploader";
import { PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import { canEditReport } from "@/features/shared/policies";
import { wizardCatalogue } from "../../_wizard-catalogue";

export const metadata = { title: "Edit report" };

export default async function EditReportPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ step?: string }>;
}) {
  const [{ id }, { step }] = await Promise.all([params, searchParams]);
  const actor = await getPageActor();
  const report = await pageData(getReportById(actor, id));
  // updateReport checks again on every save; this only sends the reader to a page they can use.
  if (!canEditReport(actor, { authorId: report.author?.id ?? "", status: report.status })) redirect(`/reports/${id}`);
  return (
    <div className="grid gap-6">
      <PageTitle>{report.status === "returned" ? "Fix and resubmit" : "Edit draft report"}</PageTitle>
      <ReportWizard
        key={`${report.id}-${report.updatedAt}`}
        catalogue={await wizardCatalogue()}
        report={report}
        step={Number(step ?? 0) || 0}
        photos={<PhotoUploader reportId={report.id} existing={report.photos} />}
      />
    </div>
  );
}
