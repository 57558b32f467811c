import { PageTitle } from "@/features/shared/components/ui";
import { QueueTable } from "@/features/review/components/queue-table";
import { getPageActor } from "@/features/members/server";
import { countAwaitingReview } from "@/features/review/server";
import { pageData } from "@/features/shared/server/page";

export const metadata = { title: "Review queue" };

export default async function ReviewQueuePage() {
  const waiting = await pageData(countAwaitingReview({ actor: await getPageActor() }));
  return (
    <div className="grid gap-6">
      <PageTitle
        lead={`${waiting} report${waiting === 1 ? "" : "s"} waiting. Reports count only once a moderator accepts them. Oldest first; each flag is explained in words on the report's review page. You cannot decide on your own reports. Press ? for keyboard shortcuts.`}
      >
        Review queue
      </PageTitle>
      <QueueTable />
    </div>
  );
}
