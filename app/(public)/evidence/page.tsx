import Link from "next/link";
import { getCatalogue } from "@/features/catalogue/server";
import { getSummaries } from "@/features/evidence/server";
import { counts, fmtDose, pct } from "@/features/evidence/components/format";
import { Cautions } from "@/features/shared/components/cautions";
import { Notice, PageTitle } from "@/features/shared/components/ui";

export const metadata = { title: "Evidence" };

export default async function EvidencePage({ searchParams }: { searchParams: Promise<{ agent?: string; condition?: string }> }) {
  const sp = await searchParams;
  const catalogue = await getCatalogue();
  const agentSlug = catalogue.agents.some((a) => a.slug === sp.agent) ? sp.agent! : "hydrogen-peroxide";
  const condition = catalogue.conditions.some((c) => c.slug === sp.condition) ? sp.condition : undefined;
  const s = await getSummaries(agentSlug, condition);
  const q = new URLSearchParams({ agent: agentSlug, ...(condition ? { condition } : {}) });
  return (
    <div className="grid gap-6">
      <PageTitle lead={`What members' fish tolerated, per group, for ${s.agentName.toLowerCase()}. Only reports a moderator accepted count. Intervals are ${s.confidenceLevel} %.`}>Evidence</PageTitle>
      <Notice tone="caution" title="Anecdotal evidence">{s.notice}</Notice>
      <form className="flex flex-wrap items-end gap-4 no-print" method="get">
        <div className="grid gap-1">
          <label htmlFor="agent" className="font-bold">Treatment</label>
          <select id="agent" name="agent" defaultValue={agentSlug} className="rounded-md border border-peat-300 bg-white px-3 py-2">
            {catalogue.agents.map((a) => <option key={a.slug} value={a.slug}>{a.name}</option>)}
          </select>
        </div>
        <div className="grid gap-1">
          <label htmlFor="condition" className="font-bold">Condition treated</label>
          <select id="condition" name="condition" defaultValue={condition ?? ""} className="rounded-md border border-peat-300 bg-white px-3 py-2">
            <option value="">Any condition</option>
            {catalogue.conditions.map((c) => <option key={c.slug} value={c.slug}>{c.name}</option>)}
          </select>
        </div>
        <button type="submit" className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white">Show</button>
        <a href={`/api/export/summaries.csv?${q}`} className="rounded-md border border-peat-500 px-4 py-2 font-bold no-underline">Download as CSV</a>
      </form>
      <div className="overflow-x-auto rounded-lg border border-peat-100 bg-white">
        <table className="w-full text-left" data-testid="evidence-table">
          <caption className="sr-only">Summaries per species group for {s.agentName}</caption>
          <thead className="bg-peat-50">
            <tr>
              <th scope="col" className="px-3 py-2">Group</th>
              <th scope="col" className="px-3 py-2">Evidence</th>
              <th scope="col" className="px-3 py-2">Tolerated</th>
              <th scope="col" className="px-3 py-2">Tolerated range (p25–p75, {s.unit})</th>
              <th scope="col" className="px-3 py-2">Median tolerated (interval)</th>
              <th scope="col" className="px-3 py-2">Lowest dose that went badly</th>
            </tr>
          </thead>
          <tbody>
            {s.groups.map((g) => (
              <tr key={g.group.slug} className="border-t border-peat-100 align-top">
                <th scope="row" className="px-3 py-2">
                  <Link href={`/evidence/${g.group.slug}?${q}`}>{g.group.name}</Link>
                  {g.reports > 0 && g.sparse ? <span className="ml-2 rounded bg-reed-100 px-1.5 text-xs font-normal">too few to lean on</span> : null}
                </th>
                <td className="px-3 py-2">{g.reports ? counts(g.reports, g.members, g.fish) : <span className="text-peat-700">No accepted reports yet</span>}</td>
                <td className="px-3 py-2">{g.reports ? <>{g.tolerated} of {g.reports} ({pct(g.toleratedShare.value)}; {pct(g.toleratedShare.low)}–{pct(g.toleratedShare.high)})</> : "—"}</td>
                <td className="px-3 py-2">{g.toleratedDose.p25 == null ? "—" : `${fmtDose(g.toleratedDose.p25)}–${fmtDose(g.toleratedDose.p75)}`}</td>
                <td className="px-3 py-2">
                  {fmtDose(g.toleratedDose.median)}
                  {g.toleratedDose.medianInterval ? ` (${fmtDose(g.toleratedDose.medianInterval.low)}–${fmtDose(g.toleratedDose.medianInterval.high)})` : g.tolerated ? " (too few for an interval)" : ""}
                </td>
                <td className="px-3 py-2">{g.lowestAdverseDose == null ? "none reported" : `${fmtDose(g.lowestAdverseDose)} ${s.unit}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-sm text-peat-700">
        A group with fewer than {s.minReports} reports is marked “too few to lean on”: its figures are shown but say little. Tolerated: no fish lost to the
        treatment or an unknown cause, and no severe distress. Method {s.methodVersion}; see the cautions before treating.
      </p>
      <Cautions compact />
    </div>
  );
}
