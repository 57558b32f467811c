import { PageTitle } from "@/features/shared/components/ui";
import { QueueTable } from "@/features/review/components/queue-table";

export const metadata = { title: "Review queue" };

export default function ReviewQueuePage() {
  return (
    <div className="grid gap-6">
      <PageTitle lead="Reports count only once a moderator accepts them. Oldest first; hover a flag for its explanation. You cannot decide on your own reports.">Review queue</PageTitle>
      <QueueTable />
    </div>
  );
}
