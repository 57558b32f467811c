"use client";

import Link from "next/link";
import { useQuery } from "@tanstack/react-query";
import {
  createColumnHelper,
  rowPaginationFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
} from "@tanstack/react-table";
import { useDeferredValue, useId, useState } from "react";
import { Pager, TableView } from "@/features/shared/components/table-parts";
import { useServerTable } from "@/features/shared/components/use-server-table";
import { Select, TextInput } from "@/features/shared/components/ui";
import { ApiError } from "@/features/shared/fetch-json";
import { StatusBadge } from "@/features/reports/components/status-badge";
import { statusLabels } from "@/features/reports";
import { allReportsQuery, type AllReportsFilters } from "../api/queries";
import { listedStatuses, type AllReportsRow } from "../schemas";
import { FilterX } from "lucide-react";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, AllReportsRow>();
const emptyRows: AllReportsRow[] = [];

const fmtDose = (r: AllReportsRow) =>
  r.concentration == null
    ? "—"
    : `${r.concentration >= 10 ? r.concentration.toFixed(1) : r.concentration.toPrecision(2)} ${r.unit ?? ""}`;
const fmtDay = (iso: string | null) =>
  iso ? new Date(iso).toLocaleDateString("en-GB", { year: "numeric", month: "short", day: "numeric" }) : "—";

/** What the review page offers for a report in this status. */
function actionLabel(r: AllReportsRow): string {
  if (r.isMine) return "Open (your own)";
  if (r.status === "accepted") return "Retract…";
  if (r.status === "awaiting_review") return "Decide…";
  return "Open";
}

function ActionLink({ row }: { row: AllReportsRow }) {
  return (
    <Link
      href={`/review/${row.id}`}
      aria-label={`${actionLabel(row)} ${row.species}, ${row.member.name}`}
      className="whitespace-nowrap font-bold"
    >
      {actionLabel(row)}
    </Link>
  );
}

const columns = helper.columns([
  helper.accessor("species", {
    header: "Fish",
    cell: (c) => (
      <Link href={`/review/${c.row.original.id}`} className="font-bold">
        {c.getValue()}
      </Link>
    ),
  }),
  helper.accessor("status", { header: "Status", cell: (c) => <StatusBadge status={c.getValue()} /> }),
  helper.accessor((r) => r.groupName ?? "—", { id: "group", header: "Group" }),
  helper.accessor((r) => r.agentName ?? "—", { id: "agent", header: "Treatment" }),
  helper.accessor("concentration", { header: "Peak dose", cell: (c) => fmtDose(c.row.original) }),
  helper.accessor((r) => r.member.name, {
    id: "member",
    header: "Member",
    cell: (c) => (
      <>
        {c.getValue()}
        {c.row.original.isMine ? " (you)" : ""}
      </>
    ),
  }),
  helper.accessor("submittedAt", { header: "Submitted", cell: (c) => fmtDay(c.getValue()) }),
  helper.accessor("decidedAt", { header: "Decided", cell: (c) => fmtDay(c.getValue()) }),
  helper.display({ id: "action", header: "Action", cell: (c) => <ActionLink row={c.row.original} /> }),
]);

/** The same rows as cards, for narrow screens where nine columns do not fit. */
function Cards({ rows }: { rows: AllReportsRow[] }) {
  return (
    <ul className="grid gap-3" aria-label="Reports">
      {rows.map((r) => (
        <li key={r.id} className="grid gap-1 rounded-lg border border-peat-100 bg-white p-3">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <Link href={`/review/${r.id}`} className="font-bold">
              {r.species}
            </Link>
            <StatusBadge status={r.status} />
          </div>
          <p className="text-sm">
            {r.agentName ?? "—"} · {fmtDose(r)} · {r.groupName ?? "no group"}
          </p>
          <p className="text-sm text-peat-700">
            {r.member.name}
            {r.isMine ? " (you)" : ""} · submitted {fmtDay(r.submittedAt)}
            {r.decidedAt ? ` · decided ${fmtDay(r.decidedAt)}` : ""}
          </p>
          <ActionLink row={r} />
        </li>
      ))}
    </ul>
  );
}

const noFilters: AllReportsFilters = {
  status: "",
  group: "",
  agent: "",
  member: "",
  dateOf: "submitted",
  from: "",
  to: "",
};

export function AllReportsTable({
  groups,
  agents,
  initial,
}: {
  groups: { slug: string; name: string }[];
  agents: { slug: string; name: string }[];
  initial?: Partial<AllReportsFilters>;
}) {
  const id = useId();
  const [filters, setFilters] = useState<AllReportsFilters>({ ...noFilters, ...initial });
  const server = useServerTable([{ id: "submittedAt", desc: true }], 25);
  const { pagination } = server;
  const member = useDeferredValue(filters.member);
  const query = useQuery(allReportsQuery({ ...filters, member, ...server.request }));
  const table = useTable({
    features,
    columns,
    data: query.data?.reports ?? emptyRows,
    rowCount: query.data?.total ?? 0,
    ...server.options,
    getRowId: (row) => row.id,
  });
  const set = (k: keyof AllReportsFilters) => (e: { target: { value: string } }) => {
    setFilters((f) => ({ ...f, [k]: e.target.value }));
    server.firstPage();
  };
  const total = query.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / pagination.pageSize));
  const rows = query.data?.reports ?? emptyRows;
  const field = "grid min-w-0 gap-1";
  const clear = () => {
    setFilters(noFilters);
    server.firstPage();
  };
  const filtered = Object.entries(filters).some(([k, v]) => v !== noFilters[k as keyof AllReportsFilters]);
  const emptyState = query.isPending ? (
    <p className="py-6 text-center text-peat-700">Loading reports…</p>
  ) : (
    <EmptyState
      icon={<FilterX />}
      title={filtered ? "No report matches these filters." : "No report has been submitted yet."}
      action={
        filtered ? (
          <button type="button" className={emptyQuietActionClass} onClick={clear}>
            Clear filters
          </button>
        ) : undefined
      }
    >
      {filtered
        ? "Widen the dates or choose “Any” in a filter above."
        : "Reports appear here once members submit them for review."}
    </EmptyState>
  );
  return (
    <div className="grid gap-4">
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4" role="search" aria-label="Filter reports">
        <div className={field}>
          <label htmlFor={`${id}-status`} className="font-bold">
            Status
          </label>
          <Select id={`${id}-status`} className="w-full min-w-0" value={filters.status} onChange={set("status")}>
            <option value="">Any status</option>
            {listedStatuses.map((s) => (
              <option key={s} value={s}>
                {statusLabels[s]}
              </option>
            ))}
          </Select>
        </div>
        <div className={field}>
          <label htmlFor={`${id}-group`} className="font-bold">
            Species group
          </label>
          <Select id={`${id}-group`} className="w-full min-w-0" value={filters.group} onChange={set("group")}>
            <option value="">Any group</option>
            {groups.map((g) => (
              <option key={g.slug} value={g.slug}>
                {g.name}
              </option>
            ))}
          </Select>
        </div>
        <div className={field}>
          <label htmlFor={`${id}-agent`} className="font-bold">
            Treatment
          </label>
          <Select id={`${id}-agent`} className="w-full min-w-0" value={filters.agent} onChange={set("agent")}>
            <option value="">Any treatment</option>
            {agents.map((a) => (
              <option key={a.slug} value={a.slug}>
                {a.name}
              </option>
            ))}
          </Select>
        </div>
        <div className={field}>
          <label htmlFor={`${id}-member`} className="font-bold">
            Member
          </label>
          <TextInput
            id={`${id}-member`}
            className="w-full min-w-0"
            value={filters.member}
            placeholder="Name or e-mail"
            onChange={set("member")}
          />
        </div>
        <div className={field}>
          <label htmlFor={`${id}-dateof`} className="font-bold">
            Dates apply to
          </label>
          <Select id={`${id}-dateof`} className="w-full min-w-0" value={filters.dateOf} onChange={set("dateOf")}>
            <option value="submitted">Submitted</option>
            <option value="decided">Decided</option>
            <option value="started">Treatment started</option>
          </Select>
        </div>
        <div className={field}>
          <label htmlFor={`${id}-from`} className="font-bold">
            From
          </label>
          <TextInput
            id={`${id}-from`}
            className="w-full min-w-0"
            type="date"
            value={filters.from}
            onChange={set("from")}
          />
        </div>
        <div className={field}>
          <label htmlFor={`${id}-to`} className="font-bold">
            To (inclusive)
          </label>
          <TextInput id={`${id}-to`} className="w-full min-w-0" type="date" value={filters.to} onChange={set("to")} />
        </div>
        <div className="flex items-end">
          <button
            type="button"
            className="rounded-md border border-peat-300 px-3 py-2"
            onClick={() => {
              setFilters(noFilters);
              server.firstPage();
            }}
          >
            Clear filters
          </button>
        </div>
      </div>
      <p className="text-sm text-peat-700" aria-live="polite">
        {query.isFetching ? "Loading…" : `${total} report${total === 1 ? "" : "s"}`}
      </p>
      {query.isError ? (
        <p role="alert" className="font-bold text-alarm-700">
          {query.error instanceof ApiError ? query.error.message : "The report list could not be loaded."}
        </p>
      ) : null}
      <div className="sm:hidden">
        {rows.length ? (
          <Cards rows={rows} />
        ) : (
          <div className="rounded-lg border border-peat-100 bg-white">{emptyState}</div>
        )}
      </div>
      <div className="hidden sm:block">
        <TableView
          table={table}
          caption="Every submitted report, sortable by column"
          empty={emptyState}
          columnCount={columns.length}
        />
      </div>
      <Pager table={table} label="Report list pages" page={pagination.pageIndex + 1} pages={pages} />
    </div>
  );
}
