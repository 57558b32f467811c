import Link from "next/link";
import { getEvidenceCatalogue, getSummaries } from "@/features/evidence/server";
import { cards, counts, fmtDose, pct } from "@/features/evidence/components/format";
import { GroupsChart } from "@/features/evidence/components/groups-chart";
import { groupsChartRows, groupsChartSrc } from "@/features/evidence/components/chart-figures";
import { Cautions } from "@/features/shared/components/cautions";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { ChartColumn } from "lucide-react";
import { EmptyState, emptyActionClass } from "@/features/shared/components/empty-state";

export const metadata = { title: "Evidence" };

export default async function EvidencePage({
  searchParams,
}: {
  searchParams: Promise<{ agent?: string; condition?: string }>;
}) {
  const sp = await searchParams;
  const catalogue = await getEvidenceCatalogue();
  const agentSlug = catalogue.agents.some((a) => a.slug === sp.agent) ? sp.agent! : "hydrogen-peroxide";
  const condition = catalogue.conditions.some((c) => c.slug === sp.condition) ? sp.condition : undefined;
  const s = await getSummaries(agentSlug, condition);
  const q = new URLSearchParams({ agent: agentSlug, ...(condition ? { condition } : {}) });
  // The comparison picture: groups with a tolerated range to draw.
  const compared = groupsChartRows(s);
  return (
    <div className="grid gap-6">
      <PageTitle
        lead={`What members' fish tolerated, per group, for ${s.agentName.toLowerCase()}. Only reports a moderator accepted count. Intervals are ${s.confidenceLevel} %.`}
      >
        Evidence
      </PageTitle>
      <Notice tone="caution" title="Anecdotal evidence">
        {s.notice}
      </Notice>
      <form className="flex flex-wrap items-end gap-4 no-print" method="get">
        <div className="grid gap-1">
          <label htmlFor="agent" className="font-bold">
            Treatment
          </label>
          <select
            id="agent"
            name="agent"
            defaultValue={agentSlug}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          >
            {catalogue.agents.map((a) => (
              <option key={a.slug} value={a.slug}>
                {a.name}
              </option>
            ))}
          </select>
        </div>
        <div className="grid gap-1">
          <label htmlFor="condition" className="font-bold">
            Condition treated
          </label>
          <select
            id="condition"
            name="condition"
            defaultValue={condition ?? ""}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          >
            <option value="">Any condition</option>
            {catalogue.conditions.map((c) => (
              <option key={c.slug} value={c.slug}>
                {c.name}
              </option>
            ))}
          </select>
        </div>
        <button type="submit" className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white">
          Show
        </button>
        <a
          href={`/api/export/summaries.csv?${q}`}
          className="rounded-md border border-peat-500 px-4 py-2 font-bold no-underline"
        >
          Download as CSV
        </a>
      </form>
      {compared.length > 1 ? (
        <figure className="grid min-w-0 gap-1 rounded-lg border border-peat-100 bg-white p-3">
          <GroupsChart
            unit={s.unit}
            rows={compared}
            src={groupsChartSrc(s, condition)}
            alt={`Chart comparing ${compared.length} groups on one dose axis: each group's middle 80 % of tolerated doses, its median and, where fitted, its BMDL₁₀. The table below gives the figures.`}
          />
          <figcaption className="text-sm text-peat-700">
            Groups compared on one dose axis (log scale). Green bar: the middle 80 % of tolerated doses (10th to 90th
            percentile); dark dot: the median tolerated dose; red tick: the BMDL₁₀, the lower limit of the dose at which
            the fitted chance of a bad outcome reaches 10 %, where a curve could be fitted. The table below gives the
            figures as text.
          </figcaption>
        </figure>
      ) : null}
      {s.groups.length === 0 ? (
        <div className="rounded-lg border border-peat-100 bg-white">
          <EmptyState
            icon={<ChartColumn />}
            title={`No accepted reports for ${s.agentName.toLowerCase()} yet.`}
            action={
              <Link href="/reports/new" className={emptyActionClass}>
                Report a treatment
              </Link>
            }
          >
            Figures appear here once a moderator accepts members&apos; reports
            {condition ? " for this condition; try “Any condition”" : ""}. If you treat, start very low and watch
            closely.
          </EmptyState>
        </div>
      ) : (
        <div className="min-w-0 overflow-x-auto rounded-lg border border-peat-100 bg-white">
          <table className={cards.table} data-testid="evidence-table">
            <caption className="sr-only">Summaries per species group for {s.agentName}</caption>
            <thead className={cards.thead}>
              <tr>
                <th scope="col" className="px-3 py-2">
                  Group
                </th>
                <th scope="col" className="px-3 py-2">
                  Evidence
                </th>
                <th scope="col" className="px-3 py-2">
                  Tolerated
                </th>
                <th scope="col" className="px-3 py-2">
                  Tolerated range (p25–p75, {s.unit})
                </th>
                <th scope="col" className="px-3 py-2">
                  Median tolerated (interval)
                </th>
                <th scope="col" className="px-3 py-2">
                  Lowest dose that went badly
                </th>
                <th scope="col" className="px-3 py-2">
                  p10–p90 ({s.unit})
                </th>
                <th scope="col" className="px-3 py-2">
                  BMDL₁₀ ({s.unit})
                </th>
              </tr>
            </thead>
            <tbody className={cards.tbody}>
              {s.groups.map((g) => (
                <tr key={g.group.slug}>
                  <th scope="row">
                    <Link href={`/evidence/${g.group.slug}?${q}`}>{g.group.name}</Link>
                    {g.reports > 0 && g.sparse ? (
                      <span className="ml-2 rounded bg-reed-100 px-1.5 text-xs font-normal">too few to lean on</span>
                    ) : null}
                  </th>
                  <td data-label="Evidence">
                    {g.reports ? (
                      counts(g.reports, g.members, g.fish)
                    ) : (
                      <span className="text-peat-700">No accepted reports yet</span>
                    )}
                  </td>
                  <td data-label="Tolerated">
                    {g.reports ? (
                      <>
                        {g.tolerated} of {g.reports} ({pct(g.toleratedShare.value)}; {pct(g.toleratedShare.low)}–
                        {pct(g.toleratedShare.high)})
                      </>
                    ) : (
                      "—"
                    )}
                  </td>
                  <td data-label={`Tolerated range (p25–p75, ${s.unit})`}>
                    {g.toleratedDose.p25 == null
                      ? "—"
                      : `${fmtDose(g.toleratedDose.p25)}–${fmtDose(g.toleratedDose.p75)}`}
                  </td>
                  <td data-label="Median tolerated (interval)">
                    {fmtDose(g.toleratedDose.median)}
                    {g.toleratedDose.medianInterval
                      ? ` (${fmtDose(g.toleratedDose.medianInterval.low)}–${fmtDose(g.toleratedDose.medianInterval.high)})`
                      : g.tolerated
                        ? " (too few for an interval)"
                        : ""}
                  </td>
                  <td data-label="Lowest dose that went badly">
                    {g.lowestAdverseDose == null ? "none reported" : `${fmtDose(g.lowestAdverseDose)} ${s.unit}`}
                  </td>
                  <td data-label={`p10–p90 (${s.unit})`}>
                    {g.toleratedDose.p10 == null
                      ? "—"
                      : `${fmtDose(g.toleratedDose.p10)}–${fmtDose(g.toleratedDose.p90)}`}
                  </td>
                  <td data-label={`BMDL₁₀ (${s.unit})`}>
                    {g.doseResponse?.bmdl == null ? "no fitted curve" : fmtDose(g.doseResponse.bmdl)}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="text-sm text-peat-700">
        A group with fewer than {s.minReports} reports is marked “too few to lean on”: its figures are shown but say
        little. Tolerated: no fish lost to the treatment or an unknown cause, and no severe distress. Method{" "}
        {s.methodVersion}; see the cautions before treating.
      </p>
      <Cautions compact anecdotal={false} />
    </div>
  );
}
