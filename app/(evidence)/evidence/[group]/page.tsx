import Link from "next/link";
import { BackLink } from "@/features/shared/components/back-link";
import { notFound } from "next/navigation";
import { getEvidenceCatalogue, getSummaryDetail } from "@/features/evidence/server";
import { DoseChart } from "@/features/evidence/components/dose-chart";
import { RiskChart } from "@/features/evidence/components/risk-chart";
import { chartSrc, riskChartProps } from "@/features/evidence/components/chart-figures";
import { isFitted, riskAt } from "@/features/evidence";
import { getClubSettings } from "@/features/catalogue/server";
import { cautiousPlan, floorSig3 } from "@/features/dosing";
import { cards, counts, fmtDose, pct } from "@/features/evidence/components/format";
import { Cautions } from "@/features/shared/components/cautions";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { AppError } from "@/features/shared/errors";

export const metadata = { title: "Evidence for a group" };

export default async function GroupEvidencePage({
  params,
  searchParams,
}: {
  params: Promise<{ group: string }>;
  searchParams: Promise<{ agent?: string; condition?: string }>;
}) {
  const [{ group }, sp] = await Promise.all([params, searchParams]);
  const catalogue = await getEvidenceCatalogue();
  const agentSlug = catalogue.agents.some((a) => a.slug === sp.agent) ? sp.agent! : "hydrogen-peroxide";
  const condition = catalogue.conditions.some((c) => c.slug === sp.condition) ? sp.condition : undefined;
  const s = await getSummaryDetail(group, agentSlug, condition).catch((err) => {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  });
  const d = s.toleratedDose;
  const usual = d.median;
  const warn = usual != null && s.lowestAdverseDose != null && s.lowestAdverseDose <= usual;
  // The same cautious plan the planner offers (features/dosing cautiousPlan), at the club's first-dose share.
  const firstShare = (await getClubSettings()).firstDoseFraction;
  const cautious = cautiousPlan(s, firstShare);
  const plan = cautious
    ? `/planner?${new URLSearchParams({ agent: s.agent, target: String(cautious.target), fraction: String(cautious.fraction), group: s.group.slug, groupName: s.group.name })}`
    : null;
  const shareName = firstShare < 0.4 ? "a third" : "half";
  const dr = isFitted(s.doseResponse) ? s.doseResponse : null;
  // The curve read at the usual (median tolerated) dose, or at the benchmark dose where there is no median.
  const readAt = dr ? (usual ?? dr.bmd) : null;
  const read = dr && readAt ? riskAt(dr, readAt, s.confidenceLevel) : null;
  const back = new URLSearchParams({ agent: s.agent, ...(condition ? { condition } : {}) });
  return (
    <div className="grid gap-8">
      <BackLink href={`/evidence?${back}`}>All groups</BackLink>
      <PageTitle
        lead={`${s.agentName}${s.condition ? `, against ${catalogue.conditions.find((c) => c.slug === s.condition)?.name}` : ""}. ${s.reports ? counts(s.reports, s.members, s.fish) : "No accepted reports yet"}.`}
      >
        {s.group.name}
      </PageTitle>
      <Notice tone="caution" title="Anecdotal evidence">
        {s.notice}
      </Notice>
      {s.sparse && s.reports > 0 ? (
        <Notice tone="caution" title="Too few reports to lean on">
          Only {s.reports} accepted report{s.reports === 1 ? "" : "s"} (the club asks for at least {s.minReports}). The
          figures are shown, but they say little.
        </Notice>
      ) : null}

      {s.reports === 0 ? (
        <p>
          No member has reported {s.agentName.toLowerCase()} for this group yet. If you treat, start very low, watch
          closely, and <Link href="/reports/new">report what happened</Link>.
        </p>
      ) : (
        <>
          <section className="grid gap-3 md:grid-cols-3" aria-label="Key figures">
            <div className="rounded-lg border border-peat-100 bg-white p-4">
              <p className="text-sm font-bold uppercase text-peat-700">Median tolerated dose</p>
              <p className="text-3xl font-bold" data-testid="median">
                {fmtDose(d.median)} {s.unit}
              </p>
              <p className="text-sm">
                {d.medianInterval
                  ? `${Math.round(d.medianInterval.coverage * 1000) / 10} % interval ${fmtDose(d.medianInterval.low)}–${fmtDose(d.medianInterval.high)}`
                  : "too few tolerated reports for an interval"}
                ; from {s.tolerated} tolerated report{s.tolerated === 1 ? "" : "s"}
              </p>
            </div>
            <div className="rounded-lg border border-peat-100 bg-white p-4">
              <p className="text-sm font-bold uppercase text-peat-700">Tolerated</p>
              <p className="text-3xl font-bold">{pct(s.toleratedShare.value)}</p>
              <p className="text-sm">
                {s.tolerated} of {s.reports} reports; {s.confidenceLevel} % interval {pct(s.toleratedShare.low)}–
                {pct(s.toleratedShare.high)}
              </p>
            </div>
            <div
              className={`rounded-lg border p-4 ${warn ? "border-alarm-500 bg-alarm-100" : "border-peat-100 bg-white"}`}
            >
              <p className="text-sm font-bold uppercase text-peat-700">Lowest dose that went badly</p>
              <p className="text-3xl font-bold">
                {s.lowestAdverseDose == null ? "none" : `${fmtDose(s.lowestAdverseDose)} ${s.unit}`}
              </p>
              <p className="text-sm">losses to the treatment or unknown causes, or severe distress</p>
            </div>
          </section>

          <section className="grid gap-3 rounded-lg border-2 border-peat-500 bg-white p-4">
            <h2 className="text-xl font-bold text-peat-900">Plan a cautious first dose</h2>
            {warn ? (
              <p
                role="alert"
                className="rounded-md bg-alarm-100 p-3 text-lg font-bold text-alarm-700"
                data-testid="adverse-warning"
              >
                Warning: a dose at or below the median ({fmtDose(s.lowestAdverseDose)} {s.unit} ≤ {fmtDose(usual)}{" "}
                {s.unit}) has already gone badly for this group. Start well below it, on a few fish first.
              </p>
            ) : null}
            {cautious ? (
              <p data-testid="cautious-plan">
                {cautious.first.limitedBy === "median" ? (
                  <>
                    Taking the median tolerated dose, {fmtDose(usual)} {s.unit}, as the usual dose, a first dose of{" "}
                    {shareName} is{" "}
                    <strong>
                      {fmtDose(floorSig3(cautious.first.concentration))} {s.unit}
                    </strong>
                    .
                  </>
                ) : (
                  <>
                    A first dose of {shareName} the usual dose ({fmtDose(usual)} {s.unit}) would be too close to where
                    fish have fared badly, so the first dose is held at{" "}
                    <strong>
                      {fmtDose(floorSig3(cautious.first.concentration))} {s.unit}
                    </strong>{" "}
                    (
                    {cautious.first.limitedBy === "lowest_adverse"
                      ? `${shareName} the lowest dose that went badly`
                      : "the fitted curve's lower limit"}
                    ).
                  </>
                )}{" "}
                {cautious.fraction === 1
                  ? "Later doses stay at it: the usual dose is at or above where this group has fared badly."
                  : `Later doses go to the usual dose, ${fmtDose(cautious.target)} ${s.unit}, only if the fish show no distress.`}
              </p>
            ) : (
              <p>No tolerated report yet, so there is no usual dose to start from: start very low and watch closely.</p>
            )}
            {plan ? (
              <Link
                href={plan}
                className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white no-underline"
              >
                Open the planner with this first dose
              </Link>
            ) : null}
          </section>

          <section className="grid gap-2">
            <h2 className="text-xl font-bold text-peat-900">Every accepted report</h2>
            <DoseChart
              points={s.points}
              pointBins={s.pointBins}
              src={(kind, w) => chartSrc(s, kind)(w)}
              doseAlt={`Chart of the ${s.reports} accepted reports by peak dose, tolerated and adverse apart: the middle half of tolerated doses ${fmtDose(d.p25)}–${fmtDose(d.p75)} ${s.unit}, median ${fmtDose(d.median)} ${s.unit}${s.lowestAdverseDose != null ? `, lowest dose that went badly ${fmtDose(s.lowestAdverseDose)} ${s.unit}` : ""}. Described in words below.`}
              bandAlt="Chart of the share of reports tolerated in each dose band, with intervals. The band table below gives the same figures."
            />
            <p className="text-sm" data-testid="chart-text">
              In words: {s.tolerated} tolerated doses from {fmtDose(d.min)} to {fmtDose(d.max)} {s.unit}, the middle
              half between {fmtDose(d.p25)} and {fmtDose(d.p75)}, 10th and 90th percentiles {fmtDose(d.p10)} and{" "}
              {fmtDose(d.p90)}; {s.reports - s.tolerated} adverse report{s.reports - s.tolerated === 1 ? "" : "s"}
              {s.lowestAdverseDose != null ? `, the lowest at ${fmtDose(s.lowestAdverseDose)} ${s.unit}` : ""}.
            </p>
          </section>

          <section className="grid gap-2" aria-labelledby="risk-heading">
            <h2 id="risk-heading" className="text-xl font-bold text-peat-900">
              How the chance of a bad outcome rises with dose
            </h2>
            {dr && read ? (
              <>
                <figure className="grid gap-1">
                  <RiskChart
                    {...riskChartProps(s)!}
                    src={chartSrc(s, "risk")}
                    alt={`Chart of the fitted chance that a course goes badly, rising with dose: BMD₁₀ ${fmtDose(dr.bmd)} ${s.unit}, BMDL₁₀ ${fmtDose(dr.bmdl)} ${s.unit}. Described in words below.`}
                  />
                  <figcaption className="text-sm text-peat-700">
                    A logistic curve fitted to these members&apos; reports, not a controlled study. Red line: the fitted
                    chance that a course goes badly; shaded: its {s.confidenceLevel} % interval;{" "}
                    {s.points.length
                      ? "dots: each report, went badly along the top, went well along the bottom;"
                      : "bars: the reports per narrow dose band, went badly hanging from the top, went well along the bottom;"}{" "}
                    solid rule: BMD₁₀; dashed rule: BMDL₁₀.
                  </figcaption>
                </figure>
                <p data-testid="risk-text">
                  In words: at {fmtDose(read.dose)} {s.unit}
                  {usual != null ? " (the median tolerated dose)" : ""} about {pct(read.risk)} of courses went badly,{" "}
                  {s.confidenceLevel} % interval {pct(read.low)}–{pct(read.high)}. The fitted chance reaches 10 % at{" "}
                  {fmtDose(dr.bmd)} {s.unit} (BMD₁₀); the lower limit, BMDL₁₀, is {fmtDose(dr.bmdl)} {s.unit}, the upper{" "}
                  {fmtDose(dr.bmdu)} {s.unit}.
                  {dr.bmd < dr.curve[0]!.dose
                    ? ` That is below the lowest reported dose (${fmtDose(dr.curve[0]!.dose)} ${s.unit}): read from the fitted curve beyond the reports, an extrapolation.`
                    : ""}{" "}
                  Courses can go badly below the BMDL₁₀ too: it is not a safe dose.
                </p>
              </>
            ) : (
              <p data-testid="risk-text">
                No dose–response curve for these reports: {s.doseResponse?.reason ?? "it has not been computed yet."}
              </p>
            )}
          </section>

          <section className="grid gap-2">
            <h2 className="text-xl font-bold text-peat-900">By dose band</h2>
            <div className="min-w-0 overflow-x-auto rounded-lg border border-peat-100 bg-white">
              <table className={cards.table} data-testid="band-table">
                <thead className={cards.thead}>
                  <tr>
                    <th scope="col" className="px-3 py-2">
                      Dose ({s.unit})
                    </th>
                    <th scope="col" className="px-3 py-2">
                      Reports
                    </th>
                    <th scope="col" className="px-3 py-2">
                      Tolerated (interval)
                    </th>
                    <th scope="col" className="px-3 py-2">
                      Cleared (interval)
                    </th>
                  </tr>
                </thead>
                <tbody className={cards.tbody}>
                  {s.bands.map((b) => (
                    <tr key={b.from}>
                      <th scope="row">
                        {b.from} to {b.to == null ? "and above" : `under ${b.to}`}
                      </th>
                      <td data-label="Reports">{b.reports}</td>
                      <td data-label="Tolerated (interval)">
                        {b.reports
                          ? `${b.tolerated} (${pct(b.toleratedShare.value)}; ${pct(b.toleratedShare.low)}–${pct(b.toleratedShare.high)})`
                          : "—"}
                      </td>
                      <td data-label="Cleared (interval)">
                        {b.reports
                          ? `${b.cleared} (${pct(b.clearedShare.value)}; ${pct(b.clearedShare.low)}–${pct(b.clearedShare.high)})`
                          : "—"}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </section>

          <section className="grid gap-2">
            <h2 className="text-xl font-bold text-peat-900">Species in these reports</h2>
            <ul className="grid gap-1 md:grid-cols-2">
              {s.species.map((x) => (
                <li key={x.id ?? x.commonName}>
                  {x.commonName}
                  {x.scientificName ? (
                    <>
                      {" "}
                      (<i>{x.scientificName}</i>)
                    </>
                  ) : null}
                  : {x.reports} report{x.reports === 1 ? "" : "s"}
                </li>
              ))}
            </ul>
          </section>
        </>
      )}
      <section className="grid gap-2">
        <h2 className="text-xl font-bold text-peat-900">Caveats</h2>
        <ul className="list-disc pl-6">
          <li>
            Members choose what to report; courses that went badly may be reported more, or less, often than those that
            went well.
          </li>
          <li>Doses are computed from what members say they added; bottles lose strength and volumes are estimates.</li>
          <li>
            Water chemistry, temperature and the fish&apos;s condition differ from tank to tank. A group mixes species
            that may differ a lot.
          </li>
          <li>The intervals describe these reports only; they do not make a dose safe.</li>
        </ul>
      </section>
      <Cautions compact anecdotal={false} />
    </div>
  );
}
