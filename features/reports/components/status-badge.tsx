import { Ban, CircleCheck, CircleX, FilePenLine, Hourglass, Undo2, type LucideIcon } from "lucide-react";
import { statusLabels, type ReportStatus } from "../schemas";

// An icon per status as well as a colour, so the badge never relies on colour alone.
const icons: Record<ReportStatus, LucideIcon> = {
  draft: FilePenLine,
  awaiting_review: Hourglass,
  accepted: CircleCheck,
  returned: Undo2,
  declined: CircleX,
  retracted: Ban,
};

const tone: Record<ReportStatus, string> = {
  draft: "bg-peat-50 text-peat-900 border-peat-300",
  awaiting_review: "bg-reed-100 text-reed-700 border-reed-300",
  accepted: "bg-peat-100 text-peat-900 border-peat-500",
  returned: "bg-reed-100 text-reed-700 border-reed-500",
  declined: "bg-alarm-100 text-alarm-700 border-alarm-500",
  retracted: "bg-alarm-100 text-alarm-700 border-alarm-500",
};

export function StatusBadge({ status }: { status: ReportStatus }) {
  const Icon = icons[status];
  return (
    <span
      className={`inline-flex items-center gap-1 whitespace-nowrap rounded border px-2 py-0.5 text-sm font-bold ${tone[status]}`}
    >
      {Icon ? <Icon className="h-3.5 w-3.5 shrink-0" aria-hidden="true" /> : null}
      {statusLabels[status]}
    </span>
  );
}
