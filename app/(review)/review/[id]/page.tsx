import { getPageActor } from "@/features/members/server";
import { getReviewPage, getReviewQueue } from "@/features/review/server";
import { ReviewQueueNav } from "@/features/review/components/queue-shortcuts";
import { DecisionForm } from "@/features/review/components/decision-form";
import { flagLabels } from "@/features/review";
import { StatusBadge } from "@/features/reports/components/status-badge";
import { getCatalogue } from "@/features/catalogue/server";
import { PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";
import { formatDayTime } from "@/features/shared/format-time";
import { describeHistoryAction, type ReportStatus } from "@/features/reports";
import { ReportDetails } from "@/app/_components/report-details";

export const metadata = { title: "Review a report" };

const fmt = (x: number | null | undefined) => (x == null ? "—" : x >= 10 ? x.toFixed(1) : x.toPrecision(3));

const flagTitle = (code: string) => {
  const label = flagLabels[code] ?? "a point to check";
  return label.charAt(0).toUpperCase() + label.slice(1);
};

export default async function ReviewReportPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await getPageActor();
  const { report, history, context } = await pageData(getReviewPage({ actor }, id));
  const catalogue = await getCatalogue();
  // Neighbours in the queue's own order (oldest first), for the previous/next links and the j/k keys.
  const queue = (await pageData(getReviewQueue(actor))).reports.map((r) => r.id);
  const at = queue.indexOf(id);
  const prevId = at > 0 ? queue[at - 1]! : null;
  const nextId = at >= 0 ? (queue[at + 1] ?? null) : (queue[0] ?? null);
  const condition = catalogue.conditions.find((c) => c.slug === report.conditionSlug)?.name ?? report.conditionSlug;
  const group = catalogue.speciesGroups.find((g) => g.slug === report.groupSlug);
  // Accept proposals count only in the current review round (after the latest submission).
  const round = history.events.slice(
    history.events.findLastIndex((e) => e.action === "submitted" || e.action === "resubmitted") + 1,
  );
  const proposals = round.filter((e) => e.action === "propose_accept" && e.actor?.id);
  const other = proposals.find((e) => e.actor!.id !== actor?.id);
  const ceiling = {
    aboveCeiling: report.flags.some((f) => f.code === "above_ceiling"),
    proposedByMe: proposals.some((e) => e.actor!.id === actor?.id),
    proposedByOther: other ? other.actor!.name || "Another moderator" : null,
  };
  return (
    <div className="grid gap-8">
      <ReviewQueueNav prevId={prevId} nextId={nextId} position={at >= 0 ? at + 1 : null} total={queue.length} />
      <div className="grid gap-2">
        <PageTitle>
          Review: {report.species?.commonName ?? `${report.speciesOther} (not listed)`} ·{" "}
          {report.treatment.agentName ?? "?"}
        </PageTitle>
        <div className="flex flex-wrap items-center gap-3">
          <StatusBadge status={report.status as ReportStatus} />
          <span className="text-sm text-peat-700">
            Filed by {report.author?.name}
            {report.submittedAt ? (
              <>
                , submitted <When at={report.submittedAt} relative />
              </>
            ) : (
              ""
            )}
          </span>
          {report.source === "demo" ? (
            <span className="rounded bg-reed-100 px-2 py-0.5 text-sm">Demo data (invented)</span>
          ) : null}
        </div>
      </div>
      <section
        className="grid gap-2 rounded-lg border border-peat-100 bg-white p-4"
        aria-labelledby="review-flags-title"
        data-testid="review-flags"
      >
        <h2 id="review-flags-title" className="text-lg font-bold text-peat-900">
          {report.flags.length ? `Points to check first (${report.flags.length})` : "Points to check first"}
        </h2>
        {report.flags.length ? (
          <ul id="review-flags" className="grid gap-2">
            {report.flags.map((f) => (
              <li
                key={f.code}
                className={`rounded-md border-l-4 p-2 ${f.code === "above_ceiling" ? "border-alarm-700 bg-white" : "border-reed-300 bg-reed-100"}`}
              >
                <strong>{flagTitle(f.code)}:</strong> {f.message}
              </li>
            ))}
          </ul>
        ) : (
          <p id="review-flags">Nothing unusual was found when the report was submitted.</p>
        )}
      </section>
      <section
        className="grid gap-2 rounded-lg border border-peat-100 bg-white p-4"
        aria-label="Against the group's accepted reports"
      >
        <h2 className="text-lg font-bold text-peat-900">Where this dose falls</h2>
        {context && context.n > 0 ? (
          <p data-testid="dose-context">
            This report&apos;s peak dose is{" "}
            <strong>
              {fmt(report.concentration)} {report.unit}
            </strong>
            . The {context.n} accepted {group?.name ?? ""} report{context.n === 1 ? "" : "s"} for this treatment range
            from {fmt(context.min)} to {fmt(context.max)} {report.unit} (middle half {fmt(context.p25)}–
            {fmt(context.p75)}, median {fmt(context.median)}); {context.below} of them are below this dose.
          </p>
        ) : (
          <p>No accepted report of this group for this treatment yet: nothing to compare with.</p>
        )}
      </section>
      <DecisionForm
        id={report.id}
        status={report.status}
        isMine={report.isMine}
        species={
          report.speciesId
            ? null
            : catalogue.species.map((s) => ({ id: s.id, label: `${s.commonName} (${s.scientificName})` }))
        }
        lossCause={report.outcome.fishLost ? report.outcome.lossCause : null}
        ceiling={ceiling}
        flagsId="review-flags"
      />
      <section className="grid gap-2" aria-labelledby="review-course-title">
        <h2 id="review-course-title" className="text-xl font-bold text-peat-900">
          Course log
        </h2>
        {report.courseEntries.length === 0 ? (
          <p className="text-peat-700">
            {report.courseOpen
              ? "The course is open; nothing logged yet."
              : "No course log: the member reported the treatment in one go."}
          </p>
        ) : (
          <ol className="grid gap-2" data-testid="review-course-log">
            {report.courseEntries.map((e) => (
              <li key={e.id} className="rounded-md border border-peat-100 bg-white p-2">
                <strong>
                  <When at={e.at} />
                </strong>{" "}
                — {e.kind === "dose" ? `a dose of ${e.amountMl ?? "?"} mL of stock` : `observed: ${e.text ?? ""}`}
                {e.photoId ? (
                  <a href={`/api/photos/${e.photoId}?size=full`} className="ml-2 inline-block align-middle">
                    {/* Served by our own route, which checks who may see the report. */}
                    <img
                      src={`/api/photos/${e.photoId}?size=thumb`}
                      alt={`Photo with the observation of ${formatDayTime(e.at)}`}
                      className="h-20 rounded border border-peat-100 object-cover"
                    />
                  </a>
                ) : null}
              </li>
            ))}
          </ol>
        )}
      </section>
      <ReportDetails report={report} conditionName={condition ?? null} showFlags={false} />
      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">History</h2>
        <ol className="grid gap-1" data-testid="history">
          {history.events.map((e, i) => (
            <li key={i}>
              <strong>
                <When at={e.at} />
              </strong>
              : {e.actor?.name ?? "someone"} {describeHistoryAction(e.action)}
              {e.note ? ` (“${e.note}”)` : ""}
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
