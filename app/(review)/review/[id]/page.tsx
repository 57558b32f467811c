import Link from "next/link";
import { getPageActor } from "@/features/members/server";
import { getReviewPage } from "@/features/review/server";
import { DecisionForm } from "@/features/review/components/decision-form";
import { StatusBadge } from "@/features/reports/components/status-badge";
import { getCatalogue } from "@/features/catalogue/server";
import { PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import type { ReportStatus } from "@/features/reports";
import { ReportDetails } from "@/app/_components/report-details";

export const metadata = { title: "Review a report" };

const fmt = (x: number | null | undefined) => (x == null ? "—" : x >= 10 ? x.toFixed(1) : x.toPrecision(3));

export default async function ReviewReportPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await getPageActor();
  const { report, history, context } = await pageData(getReviewPage({ actor }, id));
  const catalogue = await getCatalogue();
  const condition = catalogue.conditions.find((c) => c.slug === report.conditionSlug)?.name ?? report.conditionSlug;
  const group = catalogue.speciesGroups.find((g) => g.slug === report.groupSlug);
  return (
    <div className="grid gap-8">
      <p><Link href="/review">← Review queue</Link></p>
      <div className="grid gap-2">
        <PageTitle>Review: {report.species?.commonName ?? `${report.speciesOther} (not listed)`} · {report.treatment.agentName ?? "?"}</PageTitle>
        <div className="flex flex-wrap items-center gap-3">
          <StatusBadge status={report.status as ReportStatus} />
          <span className="text-sm text-peat-700">Filed by {report.author?.name}{report.submittedAt ? `, submitted ${new Date(report.submittedAt).toLocaleString("en-GB")}` : ""}</span>
          {report.source === "demo" ? <span className="rounded bg-reed-100 px-2 py-0.5 text-sm">Demo data (invented)</span> : null}
        </div>
      </div>
      <section className="grid gap-2 rounded-lg border border-peat-100 bg-white p-4" aria-label="Against the group's accepted reports">
        <h2 className="text-lg font-bold text-peat-900">Where this dose falls</h2>
        {context && context.n > 0 ? (
          <p data-testid="dose-context">
            This report&apos;s peak dose is <strong>{fmt(report.concentration)} {report.unit}</strong>. The {context.n} accepted {group?.name ?? ""} report{context.n === 1 ? "" : "s"} for this treatment
            range from {fmt(context.min)} to {fmt(context.max)} {report.unit} (middle half {fmt(context.p25)}–{fmt(context.p75)}, median {fmt(context.median)}); {context.below} of them are below this dose.
          </p>
        ) : (
          <p>No accepted report of this group for this treatment yet: nothing to compare with.</p>
        )}
      </section>
      <DecisionForm
        id={report.id}
        status={report.status}
        isMine={report.isMine}
        species={report.speciesId ? null : catalogue.species.map((s) => ({ id: s.id, label: `${s.commonName} (${s.scientificName})` }))}
        lossCause={report.outcome.fishLost ? report.outcome.lossCause : null}
      />
      <ReportDetails report={report} conditionName={condition ?? null} />
      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">History</h2>
        <ol className="grid gap-1" data-testid="history">
          {history.events.map((e, i) => (
            <li key={i}><strong>{new Date(e.at).toLocaleString("en-GB")}</strong>: {e.actor?.name ?? "someone"} — {e.action}{e.note ? ` (“${e.note}”)` : ""}</li>
          ))}
        </ol>
      </section>
    </div>
  );
}
