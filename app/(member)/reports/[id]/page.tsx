import Link from "next/link";
import { notFound } from "next/navigation";
import { getPageActor } from "@/features/members/server";
import { getReportById, getReportHistory } from "@/features/reports/server";
import { StatusBadge } from "@/features/reports/components/status-badge";
import { CourseLog } from "@/features/reports/components/course-log";
import { ReportActions } from "@/features/reports/components/report-actions";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { AppError } from "@/features/shared/errors";
import { getCatalogue } from "@/features/catalogue/server";
import type { ReportStatus } from "@/features/reports";

export const metadata = { title: "Report" };

const actionWords: Record<string, string> = {
  created: "created the draft", course_opened: "opened the course log", submitted: "submitted it for review", resubmitted: "resubmitted it",
  accept: "accepted it", return: "returned it for changes", decline: "declined it", retract: "retracted it", photo_added: "added a photo",
  dose_logged: "logged a dose", map_species: "mapped the species", correct_loss_cause: "corrected the cause of losses", imported: "imported it",
};

const v = (x: unknown, unit = "") => (x === null || x === undefined || x === "" ? "—" : `${x}${unit}`);

export default async function ReportPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ submitted?: string }> }) {
  const [{ id }, { submitted }] = await Promise.all([params, searchParams]);
  const actor = await getPageActor();
  const report = await getReportById(actor, id).catch((err) => {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  });
  const [history, catalogue] = await Promise.all([getReportHistory(actor, id), getCatalogue()]);
  const condition = catalogue.conditions.find((c) => c.slug === report.conditionSlug)?.name ?? report.conditionSlug;
  const dose = report.concentration == null ? "—" : `${report.concentration >= 10 ? report.concentration.toFixed(1) : report.concentration.toPrecision(3)} ${report.unit}`;
  return (
    <div className="grid gap-8">
      <div className="grid gap-2">
        <p><Link href="/reports">← My reports</Link></p>
        <PageTitle>
          {report.species ? `${report.species.commonName}` : report.speciesOther ? `${report.speciesOther} (not listed)` : "Draft report"}
          {report.treatment.agentName ? ` · ${report.treatment.agentName}` : ""}
        </PageTitle>
        <div className="flex flex-wrap items-center gap-3">
          <StatusBadge status={report.status as ReportStatus} />
          {report.source === "demo" ? <span className="rounded bg-reed-100 px-2 py-0.5 text-sm">Demo data (invented)</span> : null}
          {report.author ? <span className="text-sm text-peat-700">Filed by {report.author.name}</span> : null}
        </div>
      </div>
      {submitted ? <Notice title="Submitted">A moderator will look at it; you will get an e-mail when they decide.</Notice> : null}
      {report.lastNote?.note && ["returned", "declined", "retracted"].includes(report.status) ? (
        <div role="note" className="rounded-md border-l-4 border-reed-500 bg-reed-100 p-4" data-testid="moderator-note">
          <p className="font-bold">{report.status === "returned" ? "Returned for changes — the moderator's note:" : report.status === "declined" ? "Declined — the moderator's reason:" : "Retracted — the moderator's reason:"}</p>
          <p>{report.lastNote.note}</p>
        </div>
      ) : null}
      {report.isMine ? <ReportActions id={report.id} status={report.status} /> : null}

      <section className="grid gap-6 md:grid-cols-2">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 rounded-lg border border-peat-100 bg-white p-4">
          <dt className="col-span-2 text-lg font-bold text-peat-900">Fish</dt>
          <dt className="font-bold">Species</dt><dd>{report.species ? <>{report.species.commonName} (<i>{report.species.scientificName}</i>)</> : v(report.speciesOther)}</dd>
          <dt className="font-bold">Fish treated</dt><dd>{v(report.fishCount)} ({v(report.sizeClass)})</dd>
          <dt className="font-bold">Condition</dt><dd>{v(condition)}</dd>
          <dt className="font-bold">Started</dt><dd>{v(report.startedOn)}</dd>
          <dt className="col-span-2 mt-2 text-lg font-bold text-peat-900">Water</dt>
          <dt className="font-bold">Volume</dt><dd>{v(report.water.volume)} {report.water.volumeUnit} {report.water.volumeL ? `(${report.water.volumeL.toFixed(1)} L)` : ""}</dd>
          <dt className="font-bold">Temperature</dt><dd>{v(report.water.temperature)} °{report.water.temperatureUnit}</dd>
          <dt className="font-bold">pH</dt><dd>{v(report.water.ph)}</dd>
          <dt className="font-bold">Tank</dt><dd>{v(report.water.setting)}</dd>
        </dl>
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 rounded-lg border border-peat-100 bg-white p-4">
          <dt className="col-span-2 text-lg font-bold text-peat-900">Treatment</dt>
          <dt className="font-bold">Stock</dt><dd>{report.treatment.stockPercent ? `${report.treatment.stockPercent} % ${report.treatment.stockBasis ?? "w/v"}` : "—"}</dd>
          <dt className="font-bold">Per dose</dt><dd>{v(report.treatment.amountMl, " mL")}</dd>
          <dt className="font-bold">Stated</dt><dd>{report.treatment.statedConcentration ? `${report.treatment.statedConcentration} ${report.unit}` : "—"}</dd>
          <dt className="font-bold">Peak dose (computed)</dt><dd data-testid="computed-concentration">{dose}</dd>
          <dt className="font-bold">Doses</dt><dd>{v(report.treatment.doses)}{report.treatment.intervalHours ? `, every ${report.treatment.intervalHours} h` : ""}</dd>
          <dt className="font-bold">Alongside</dt><dd>{v(report.treatment.otherTreatments)}</dd>
          <dt className="col-span-2 mt-2 text-lg font-bold text-peat-900">Outcome</dt>
          <dt className="font-bold">Fish lost</dt><dd>{v(report.outcome.fishLost)}{report.outcome.lossCause ? ` (likely cause: ${report.outcome.lossCause})` : ""}</dd>
          <dt className="font-bold">Distress</dt><dd>{v(report.outcome.distress)}</dd>
          <dt className="font-bold">Condition</dt><dd>{v(report.outcome.condition)}</dd>
          <dt className="font-bold">Watched</dt><dd>{v(report.outcome.observedDaysAfter, " days after the last dose")}</dd>
          <dt className="font-bold">Notes</dt><dd>{v(report.outcome.notes)}</dd>
        </dl>
      </section>

      {report.flags.length ? (
        <section className="grid gap-2">
          <h2 className="text-xl font-bold text-peat-900">Points a moderator will check</h2>
          <ul className="list-disc pl-6">{report.flags.map((f) => <li key={f.code}>{f.message}</li>)}</ul>
        </section>
      ) : null}

      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">Photos</h2>
        {report.photos.length === 0 ? (
          <p className="text-peat-700">No photos.</p>
        ) : (
          <ul className="flex flex-wrap gap-3" data-testid="report-photos">
            {report.photos.map((p) => (
              <li key={p.id}>
                <a href={`/api/photos/${p.id}?size=full`}>
                  {/* Served by our own route, which checks who may see the report. */}
                  <img src={`/api/photos/${p.id}?size=thumb`} alt={`Photo taken ${p.stage} treatment (${p.width} × ${p.height})`} className="h-32 rounded border border-peat-100 object-cover" />
                </a>
              </li>
            ))}
          </ul>
        )}
      </section>

      {report.courseOpen || report.courseEntries.length ? (
        <CourseLog reportId={report.id} entries={report.courseEntries} open={report.isMine && report.status === "draft"} />
      ) : null}

      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">History</h2>
        <ol className="grid gap-1" data-testid="history">
          {history.events.map((e, i) => (
            <li key={i}>
              <time dateTime={e.at} className="font-bold">{new Date(e.at).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}</time>: {e.actor?.name ?? "someone"} {actionWords[e.action] ?? e.action}
              {e.note ? <> — “{e.note}”</> : null}
            </li>
          ))}
        </ol>
      </section>
    </div>
  );
}
