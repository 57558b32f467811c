import { BackLink } from "@/features/shared/components/back-link";
import { getPageActor } from "@/features/members/server";
import { getCourse, getReportById, getReportHistory } from "@/features/reports/server";
import { StatusBadge } from "@/features/reports/components/status-badge";
import { CourseLog } from "@/features/reports/components/course-log";
import { ReportActions } from "@/features/reports/components/report-actions";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import { getCatalogue } from "@/features/catalogue/server";
import { groupSummary } from "@/features/evidence/server";
import { ReportDetails } from "@/app/_components/report-details";
import { describeHistoryAction, type ReportStatus } from "@/features/reports";
import { When } from "@/features/shared/components/when";

export const metadata = { title: "Report" };

export default async function ReportPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ submitted?: string }>;
}) {
  const [{ id }, { submitted }] = await Promise.all([params, searchParams]);
  const actor = await getPageActor();
  const report = await pageData(getReportById(actor, id));
  const [history, catalogue] = await Promise.all([pageData(getReportHistory(actor, id)), getCatalogue()]);
  const course =
    report.courseOpen || report.courseEntries.length
      ? await pageData(getCourse(actor, id, { loadEvidence: groupSummary }))
      : null;
  const condition = catalogue.conditions.find((c) => c.slug === report.conditionSlug)?.name ?? report.conditionSlug;
  return (
    <div className="grid gap-8">
      <div className="grid gap-2">
        <BackLink href="/reports">My reports</BackLink>
        <PageTitle>
          {report.species
            ? `${report.species.commonName}`
            : report.speciesOther
              ? `${report.speciesOther} (not listed)`
              : "Draft report"}
          {report.treatment.agentName ? ` · ${report.treatment.agentName}` : ""}
        </PageTitle>
        <div className="flex flex-wrap items-center gap-3">
          <StatusBadge status={report.status as ReportStatus} />
          {report.source === "demo" ? (
            <span className="rounded bg-reed-100 px-2 py-0.5 text-sm">Demo data (invented)</span>
          ) : null}
          {report.author ? <span className="text-sm text-peat-700">Filed by {report.author.name}</span> : null}
        </div>
      </div>
      {submitted ? (
        <Notice title="Submitted">A moderator will look at it; you will get an e-mail when they decide.</Notice>
      ) : null}
      {report.lastNote?.note && ["returned", "declined", "retracted"].includes(report.status) ? (
        <div role="note" className="rounded-md border-l-4 border-reed-500 bg-reed-100 p-4" data-testid="moderator-note">
          <p className="font-bold">
            {report.status === "returned"
              ? "Returned for changes — the moderator's note:"
              : report.status === "declined"
                ? "Declined — the moderator's reason:"
                : "Retracted — the moderator's reason:"}
          </p>
          <p>{report.lastNote.note}</p>
        </div>
      ) : null}
      {report.isMine ? <ReportActions id={report.id} status={report.status} /> : null}

      <ReportDetails report={report} conditionName={condition ?? null} />

      {course ? (
        <CourseLog
          reportId={report.id}
          entries={course.entries}
          figures={course}
          open={report.isMine && report.status === "draft"}
        />
      ) : null}

      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">History</h2>
        <ol className="grid gap-1" data-testid="history">
          {history.events.map((e, i) => (
            <li key={i}>
              <When at={e.at} className="font-bold" />: {e.actor?.name ?? "someone"} {describeHistoryAction(e.action)}
              {e.note ? <> — “{e.note}”</> : null}
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
