"use client";

import Link from "next/link";
import { useQuery } from "@tanstack/react-query";
import { createColumnHelper, rowPaginationFeature, rowSortingFeature, tableFeatures, useTable, type PaginationState, type SortingState } from "@tanstack/react-table";
import { useId, useState } from "react";
import { ApiError } from "@/features/shared/fetch-json";
import { myReportsQuery, type MyReportRow } from "../api/queries";
import { reportStatuses, statusLabels } from "../schemas";
import { StatusBadge } from "./status-badge";

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, MyReportRow>();
const empty: MyReportRow[] = [];
const fmtDose = (r: MyReportRow) => (r.concentration == null ? "—" : `${r.concentration >= 10 ? r.concentration.toFixed(1) : r.concentration.toPrecision(2)} ${r.unit ?? ""}`);

const columns = helper.columns([
  helper.accessor("status", { header: "Status", cell: (c) => <StatusBadge status={c.getValue()} /> }),
  helper.accessor("species", {
    header: "Fish",
    cell: (c) => (
      <>
        <Link href={`/reports/${c.row.original.id}`} className="font-bold">
          {c.getValue() ?? "(species not yet given)"}
        </Link>
        {c.row.original.source === "demo" ? <span className="ml-2 rounded bg-reed-100 px-1 text-xs">demo data</span> : null}
        {c.row.original.courseOpen ? <span className="ml-2 rounded bg-peat-50 px-1 text-xs">course open</span> : null}
      </>
    ),
  }),
  helper.accessor("agentName", { id: "agent", header: "Treatment", cell: (c) => c.getValue() ?? "—" }),
  helper.accessor("concentration", { header: "Peak dose", cell: (c) => fmtDose(c.row.original) }),
  helper.accessor("startedOn", { header: "Started", cell: (c) => c.getValue() ?? "—" }),
  helper.accessor("updatedAt", { header: "Last change", cell: (c) => new Date(c.getValue()).toLocaleDateString("en-GB") }),
]);

export function MyReportsTable() {
  const id = useId();
  const [status, setStatus] = useState("");
  const [sorting, setSorting] = useState<SortingState>([{ id: "updatedAt", desc: true }]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 20 });
  const sort = sorting[0];
  const query = useQuery(myReportsQuery({ status, sort: sort?.id ?? "updatedAt", dir: sort?.desc ? "desc" : "asc", page: pagination.pageIndex + 1, pageSize: pagination.pageSize }));
  const table = useTable({
    features,
    columns,
    data: query.data?.reports ?? empty,
    rowCount: query.data?.total ?? 0,
    state: { sorting, pagination },
    onSortingChange: (u) => {
      setSorting(u);
      setPagination((p) => ({ ...p, pageIndex: 0 }));
    },
    onPaginationChange: setPagination,
    manualSorting: true,
    manualPagination: true,
    enableMultiSort: false,
    getRowId: (r) => r.id,
  });
  const total = query.data?.total ?? 0;
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-4">
        <div className="grid gap-1">
          <label htmlFor={`${id}-status`} className="font-bold">Status</label>
          <select id={`${id}-status`} className="rounded-md border border-peat-300 bg-white px-3 py-2" value={status} onChange={(e) => { setStatus(e.target.value); setPagination((p) => ({ ...p, pageIndex: 0 })); }}>
            <option value="">Any status</option>
            {reportStatuses.map((s) => (
              <option key={s} value={s}>{statusLabels[s]}</option>
            ))}
          </select>
        </div>
        <p aria-live="polite" className="text-sm text-peat-700">{query.isFetching ? "Loading…" : `${total} report${total === 1 ? "" : "s"}`}</p>
      </div>
      {query.isError ? <p role="alert" className="font-bold text-alarm-700">{query.error instanceof ApiError ? query.error.message : "Your reports could not be loaded."}</p> : null}
      <div className="overflow-x-auto rounded-lg border border-peat-100 bg-white">
        <table className="w-full text-left">
          <caption className="sr-only">Your treatment reports</caption>
          <thead className="bg-peat-50">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} scope="col" className="px-3 py-2" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}>
                      <button type="button" className="font-bold" onClick={h.column.getToggleSortingHandler()}>
                        <table.FlexRender header={h} />
                        <span aria-hidden="true">{sorted === "asc" ? " ▲" : sorted === "desc" ? " ▼" : ""}</span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-8 text-center text-peat-700">
                  {query.isPending ? "Loading your reports…" : status ? "No report has this status." : (
                    <>You have not reported a treatment yet. <Link href="/reports/new">Report one</Link> or <Link href="/reports/new?course=1">start a course log</Link>.</>
                  )}
                </td>
              </tr>
            ) : (
              table.getRowModel().rows.map((row) => (
                <tr key={row.id} className="border-t border-peat-100">
                  {row.getAllCells().map((cell) => (
                    <td key={cell.id} className="px-3 py-2"><table.FlexRender cell={cell} /></td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label="Report list pages" className="flex items-center gap-3">
        <button type="button" className="rounded border border-peat-300 px-3 py-1 disabled:opacity-40" disabled={!table.getCanPreviousPage()} onClick={() => table.previousPage()}>Previous</button>
        <span>Page {pagination.pageIndex + 1} of {Math.max(1, Math.ceil(total / pagination.pageSize))}</span>
        <button type="button" className="rounded border border-peat-300 px-3 py-1 disabled:opacity-40" disabled={!table.getCanNextPage()} onClick={() => table.nextPage()}>Next</button>
      </nav>
    </div>
  );
}
