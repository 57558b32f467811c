"use client";

import { Pager, TableView } from "@/features/shared/components/table-parts";
import { useServerTable } from "@/features/shared/components/use-server-table";
import Link from "next/link";
import { useQuery } from "@tanstack/react-query";
import {
  createColumnHelper,
  rowPaginationFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
} from "@tanstack/react-table";
import { useId, useState } from "react";
import { ApiError } from "@/features/shared/fetch-json";
import { myReportsQuery, type MyReportRow } from "../api/queries";
import { reportStatuses, statusLabels } from "../schemas";
import { StatusBadge } from "./status-badge";
import { FilterX, NotebookPen } from "lucide-react";
import { EmptyState, emptyActionClass, emptyQuietActionClass } from "@/features/shared/components/empty-state";
import { When } from "@/features/shared/components/when";
import { formatDay } from "@/features/shared/format-time";

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, MyReportRow>();
const empty: MyReportRow[] = [];
const fmtDose = (r: MyReportRow) =>
  r.concentration == null
    ? "—"
    : `${r.concentration >= 10 ? r.concentration.toFixed(1) : r.concentration.toPrecision(2)} ${r.unit ?? ""}`;

const columns = helper.columns([
  helper.accessor("status", { header: "Status", cell: (c) => <StatusBadge status={c.getValue()} /> }),
  helper.accessor("species", {
    header: "Fish",
    cell: (c) => (
      <>
        <Link href={`/reports/${c.row.original.id}`} className="font-bold">
          {c.getValue() ?? "(species not yet given)"}
        </Link>
        {c.row.original.source === "demo" ? (
          <span className="ml-2 rounded bg-reed-100 px-1 text-xs">demo data</span>
        ) : null}
        {c.row.original.courseOpen ? <span className="ml-2 rounded bg-peat-50 px-1 text-xs">course open</span> : null}
      </>
    ),
  }),
  helper.accessor("agentName", { id: "agent", header: "Treatment", cell: (c) => c.getValue() ?? "—" }),
  helper.accessor("concentration", { header: "Peak dose", cell: (c) => fmtDose(c.row.original) }),
  helper.accessor("startedOn", {
    header: "Started",
    cell: (c) => {
      const d = c.getValue();
      return d ? <time dateTime={d}>{formatDay(`${d}T12:00:00Z`)}</time> : "—";
    },
  }),
  helper.accessor("updatedAt", {
    header: "Last change",
    cell: (c) => <When at={c.getValue()} relative withTime={false} />,
  }),
]);

export function MyReportsTable() {
  const id = useId();
  const [status, setStatus] = useState("");
  const server = useServerTable([{ id: "updatedAt", desc: true }]);
  const { pagination } = server;
  const query = useQuery(myReportsQuery({ status, ...server.request }));
  const table = useTable({
    features,
    columns,
    data: query.data?.reports ?? empty,
    rowCount: query.data?.total ?? 0,
    ...server.options,
    getRowId: (r) => r.id,
  });
  const total = query.data?.total ?? 0;
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-4">
        <div className="grid gap-1">
          <label htmlFor={`${id}-status`} className="font-bold">
            Status
          </label>
          <select
            id={`${id}-status`}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
            value={status}
            onChange={(e) => {
              setStatus(e.target.value);
              server.firstPage();
            }}
          >
            <option value="">Any status</option>
            {reportStatuses.map((s) => (
              <option key={s} value={s}>
                {statusLabels[s]}
              </option>
            ))}
          </select>
        </div>
        <p aria-live="polite" className="text-sm text-peat-700">
          {query.isFetching ? "Loading…" : `${total} report${total === 1 ? "" : "s"}`}
        </p>
      </div>
      {query.isError ? (
        <p role="alert" className="font-bold text-alarm-700">
          {query.error instanceof ApiError ? query.error.message : "Your reports could not be loaded."}
        </p>
      ) : null}
      <TableView
        table={table}
        caption="Your treatment reports"
        empty={
          query.isPending ? (
            <p className="py-8">Loading your reports…</p>
          ) : status ? (
            <EmptyState
              icon={<FilterX />}
              title={`None of your reports is “${statusLabels[status as keyof typeof statusLabels] ?? status}”.`}
              action={
                <button
                  type="button"
                  className={emptyQuietActionClass}
                  onClick={() => {
                    setStatus("");
                    server.firstPage();
                  }}
                >
                  Show every status
                </button>
              }
            >
              The status chosen above hides the rest of your reports.
            </EmptyState>
          ) : (
            <EmptyState
              icon={<NotebookPen />}
              title="You have not reported a treatment yet."
              action={
                <>
                  <Link href="/reports/new" className={emptyActionClass}>
                    Report a finished treatment
                  </Link>
                  <Link href="/reports/new?course=1" className={emptyQuietActionClass}>
                    Start a course log
                  </Link>
                </>
              }
            >
              Your reports and drafts will be listed here, with where each stands in review. Each one adds to what the
              club knows.
            </EmptyState>
          )
        }
        columnCount={columns.length}
      />
      <Pager
        table={table}
        label="Report list pages"
        page={pagination.pageIndex + 1}
        pages={Math.ceil(total / pagination.pageSize)}
      />
    </div>
  );
}
