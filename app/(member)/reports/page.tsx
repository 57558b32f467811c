import Link from "next/link";
import { PageTitle } from "@/features/shared/components/ui";
import { MyReportsTable } from "@/features/reports/components/my-reports-table";
import { listMineQuerySchema } from "@/features/reports";
import { getPageActor } from "@/features/members/server";
import { getReportsByAuthorId } from "@/features/reports/server";
import { pageData } from "@/features/shared/server/page";

export const metadata = { title: "My reports" };

export default async function MyReportsPage() {
  const mine = await pageData(getReportsByAuthorId(await getPageActor(), listMineQuerySchema.parse({ pageSize: 1 })));
  return (
    <div className="grid gap-6">
      <PageTitle
        lead={`Every treatment you have reported or are logging (${mine.total}), with where it stands in review.`}
      >
        My reports
      </PageTitle>
      <div className="flex flex-wrap gap-3">
        <Link href="/reports/new" className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white no-underline">
          Report a finished treatment
        </Link>
        <Link
          href="/reports/new?course=1"
          className="rounded-md border border-peat-500 bg-white px-4 py-2 font-bold no-underline"
        >
          Start a course log
        </Link>
      </div>
      <MyReportsTable />
    </div>
  );
}
