import { statusLabels, type ReportStatus } from "../schemas";

const tone: Record<ReportStatus, string> = {
  draft: "bg-peat-50 text-peat-900 border-peat-300",
  awaiting_review: "bg-reed-100 text-reed-700 border-reed-300",
  accepted: "bg-peat-100 text-peat-900 border-peat-500",
  returned: "bg-reed-100 text-reed-700 border-reed-500",
  declined: "bg-alarm-100 text-alarm-700 border-alarm-500",
  retracted: "bg-alarm-100 text-alarm-700 border-alarm-500",
};

export function StatusBadge({ status }: { status: ReportStatus }) {
  return <span className={`inline-block rounded border px-2 py-0.5 text-sm font-bold ${tone[status]}`}>{statusLabels[status]}</span>;
}
