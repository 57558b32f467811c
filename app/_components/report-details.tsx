import type { ReportView } from "@/features/reports/server";
import { reportValueLabels } from "@/features/reports";
import { volumeUnitLabels, type VolumeUnit } from "@/features/dosing";
import { formatDay } from "@/features/shared/format-time";

const v = (x: unknown, unit = "") => (x === null || x === undefined || x === "" ? "—" : `${x}${unit}`);
/** A stored choice in words; an unknown one still loses its underscores. */
const w = (x: string | null | undefined) => (x ? (reportValueLabels[x] ?? x.replaceAll("_", " ")) : "—");

/** The fields, flags and photos of one report, for its member's page and the review page. */
export function ReportDetails({
  report,
  conditionName,
  showFlags = true,
}: {
  report: ReportView;
  conditionName: string | null;
  showFlags?: boolean;
}) {
  const condition = conditionName;
  const dose =
    report.concentration == null
      ? "—"
      : `${report.concentration >= 10 ? report.concentration.toFixed(1) : report.concentration.toPrecision(3)} ${report.unit}`;
  return (
    <>
      <section className="grid gap-6 md:grid-cols-2">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 rounded-lg border border-peat-100 bg-white p-4">
          <dt className="col-span-2 text-lg font-bold text-peat-900">Fish</dt>
          <dt className="font-bold">Species</dt>
          <dd>
            {report.species ? (
              <>
                {report.species.commonName} (<i>{report.species.scientificName}</i>)
              </>
            ) : (
              v(report.speciesOther)
            )}
          </dd>
          <dt className="font-bold">Fish treated</dt>
          <dd>
            {v(report.fishCount)} ({w(report.sizeClass)})
          </dd>
          <dt className="font-bold">Condition</dt>
          <dd>{v(condition)}</dd>
          <dt className="font-bold">Started</dt>
          <dd>
            {report.startedOn ? (
              <time dateTime={report.startedOn}>{formatDay(`${report.startedOn}T12:00:00Z`)}</time>
            ) : (
              "—"
            )}
          </dd>
          <dt className="col-span-2 mt-2 text-lg font-bold text-peat-900">Water</dt>
          <dt className="font-bold">Volume</dt>
          <dd>
            {v(report.water.volume)}{" "}
            {report.water.volumeUnit
              ? (volumeUnitLabels[report.water.volumeUnit as VolumeUnit] ?? report.water.volumeUnit)
              : ""}{" "}
            {report.water.volumeUnit !== "L" && report.water.volumeL ? `(${report.water.volumeL.toFixed(1)} L)` : ""}
          </dd>
          <dt className="font-bold">Temperature</dt>
          <dd>
            {v(report.water.temperature)} °{report.water.temperatureUnit}
          </dd>
          <dt className="font-bold">pH</dt>
          <dd>{v(report.water.ph)}</dd>
          <dt className="font-bold">Tank</dt>
          <dd>{w(report.water.setting)}</dd>
        </dl>
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 rounded-lg border border-peat-100 bg-white p-4">
          <dt className="col-span-2 text-lg font-bold text-peat-900">Treatment</dt>
          <dt className="font-bold">Stock</dt>
          <dd>
            {report.treatment.stockPercent
              ? `${report.treatment.stockPercent} % ${report.treatment.stockBasis ?? "w/v"}`
              : "—"}
          </dd>
          <dt className="font-bold">Per dose</dt>
          <dd>{v(report.treatment.amountMl, " mL")}</dd>
          <dt className="font-bold">Stated</dt>
          <dd>
            {report.treatment.statedConcentration ? `${report.treatment.statedConcentration} ${report.unit}` : "—"}
          </dd>
          <dt className="font-bold">Peak dose (computed)</dt>
          <dd data-testid="computed-concentration">{dose}</dd>
          <dt className="font-bold">Doses</dt>
          <dd>
            {v(report.treatment.doses)}
            {report.treatment.intervalHours ? `, every ${report.treatment.intervalHours} h` : ""}
          </dd>
          <dt className="font-bold">Alongside</dt>
          <dd>{v(report.treatment.otherTreatments)}</dd>
          <dt className="col-span-2 mt-2 text-lg font-bold text-peat-900">Outcome</dt>
          <dt className="font-bold">Fish lost</dt>
          <dd>
            {v(report.outcome.fishLost)}
            {report.outcome.lossCause ? ` (likely cause: ${w(report.outcome.lossCause)})` : ""}
          </dd>
          <dt className="font-bold">Distress</dt>
          <dd>{w(report.outcome.distress)}</dd>
          <dt className="font-bold">Condition</dt>
          <dd>{w(report.outcome.condition)}</dd>
          <dt className="font-bold">Watched</dt>
          <dd>{v(report.outcome.observedDaysAfter, " days after the last dose")}</dd>
          <dt className="font-bold">Notes</dt>
          <dd>{v(report.outcome.notes)}</dd>
        </dl>
      </section>

      {showFlags && report.flags.length ? (
        <section className="grid gap-2">
          <h2 className="text-xl font-bold text-peat-900">Points a moderator will check</h2>
          <ul className="list-disc pl-6">
            {report.flags.map((f) => (
              <li key={f.code}>{f.message}</li>
            ))}
          </ul>
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
                  <img
                    src={`/api/photos/${p.id}?size=thumb`}
                    alt={`Photo taken ${p.stage} treatment (${p.width} × ${p.height})`}
                    className="h-32 rounded border border-peat-100 object-cover"
                  />
                </a>
              </li>
            ))}
          </ul>
        )}
      </section>
    </>
  );
}
