import { getCatalogue } from "@/features/catalogue/server";
import { getPageActor } from "@/features/members/server";
import { listAllReports } from "@/features/review/server";
import { pageData } from "@/features/shared/server/page";
import { AllReportsTable } from "@/features/review/components/all-reports-table";
import { PageTitle } from "@/features/shared/components/ui";

export const metadata = { title: "All reports" };

const one = (v: string | string[] | undefined) => (typeof v === "string" ? v : "");

// Links may preset filters (e.g. ?status=accepted&group=corydoras); the API checks every value again.
export default async function AllReportsPage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  // The list itself comes from the API; asking the data layer here makes the page refuse whoever it refuses.
  const actor = await getPageActor();
  const [sp, catalogue, first] = await Promise.all([
    searchParams,
    getCatalogue(),
    pageData(listAllReports({ actor, params: { scope: "all", pageSize: "1" } })),
  ]);
  const dateOf = one(sp.dateOf);
  return (
    <div className="grid gap-6">
      <PageTitle lead="Every submitted report, whatever its status (drafts stay their authors' own). Filter to find one, then open it to decide, correct or retract it.">
        All reports
      </PageTitle>
      <p className="text-peat-700" data-testid="all-reports-total">
        {`${first.total === 1 ? "1 submitted report" : `${first.total} submitted reports`} in the club.`}
      </p>
      <AllReportsTable
        groups={catalogue.speciesGroups.map((g) => ({ slug: g.slug, name: g.name }))}
        agents={catalogue.agents.map((a) => ({ slug: a.slug, name: a.name }))}
        initial={{
          status: one(sp.status),
          group: one(sp.group),
          agent: one(sp.agent),
          member: one(sp.member),
          from: one(sp.from),
          to: one(sp.to),
          dateOf: dateOf === "decided" || dateOf === "started" ? dateOf : "submitted",
        }}
      />
    </div>
  );
}
