import { Cautions } from "@/features/shared/components/cautions";
import { PageTitle } from "@/features/shared/components/ui";
import { ReportWizard } from "@/features/reports/components/report-wizard";
import { CoursePlanNote } from "@/features/reports/components/course-plan-note";
import { wizardCatalogue } from "../_wizard-catalogue";
import { coursePlanFromParams } from "./course-plan";

export const metadata = { title: "Report a treatment" };

const prefillKeys = [
  "agentSlug",
  "stockFormId",
  "stockPercent",
  "stockBasis",
  "volume",
  "volumeUnit",
  "amountMl",
  // Dry salt from the planner: the first dose's g/L, from which the course log plans its grams.
  "statedConcentration",
  "intervalHours",
  "speciesId",
] as const;

export default async function NewReportPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | undefined>>;
}) {
  const sp = await searchParams;
  const course = sp.course;
  const prefill = Object.fromEntries(prefillKeys.filter((k) => sp[k]).map((k) => [k, String(sp[k]).slice(0, 40)]));
  // A course started from the planner: its plan, fish and warnings, worked out again from the same query.
  const plan = course ? await coursePlanFromParams(sp) : null;
  return (
    <div className="grid gap-6">
      <PageTitle
        lead={
          course
            ? "Start with what you know now; log each dose as you give it and finish the outcome when the course is over."
            : "Five short steps. Each is saved as a draft; nothing is shared until you submit it and a moderator accepts it."
        }
      >
        {course ? "Start a course log" : "Report a treatment"}
      </PageTitle>
      {plan ? <CoursePlanNote plan={plan} /> : null}
      <ReportWizard
        catalogue={await wizardCatalogue()}
        report={null}
        step={0}
        course={Boolean(course)}
        prefill={prefill}
      />
      <Cautions compact />
    </div>
  );
}
