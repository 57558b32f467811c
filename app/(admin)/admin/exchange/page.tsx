import { ImportForm } from "@/features/exchange/components/import-form";
import { PageTitle } from "@/features/shared/components/ui";
import { getExchangeOverview } from "@/features/exchange/server";
import { getPageActor } from "@/features/members/server";
import { pageData } from "@/features/shared/server/page";

export const metadata = { title: "Import and export" };

export default async function ExchangePage() {
  const overview = await pageData(getExchangeOverview({ actor: await getPageActor() }));
  return (
    <div className="grid min-w-0 grid-cols-1 gap-6">
      <PageTitle lead="Move reports in and out as CSV. Exports name no member: each reporter is a stable pseudonym. Every file carries the anecdotal notice.">
        Import and export
      </PageTitle>
      <section className="grid min-w-0 grid-cols-1 gap-2">
        <h2 className="text-xl font-bold text-peat-900">Export</h2>
        <ul className="list-disc pl-6">
          <li>
            <a href="/api/export/reports.csv">
              All {overview.exportable} submitted reports (CSV, reporters pseudonymised)
            </a>
            {overview.imported ? `, ${overview.imported} of them imported` : ""}
          </li>
          <li>
            <a href="/api/export/summaries.csv?agent=hydrogen-peroxide">Hydrogen peroxide summaries (CSV)</a> — other
            agents from the evidence page
          </li>
        </ul>
      </section>
      <section className="grid min-w-0 grid-cols-1 gap-2">
        <h2 className="text-xl font-bold text-peat-900">Import historical reports</h2>
        <ImportForm />
      </section>
    </div>
  );
}
