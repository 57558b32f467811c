"use client";

import { flagLabels } from "../flag-labels";
import { formatDay } from "@/features/shared/format-time";
import { Pager, TableView } from "@/features/shared/components/table-parts";
import Link from "next/link";
import { useQuery } from "@tanstack/react-query";
import {
  createColumnHelper,
  createPaginatedRowModel,
  createSortedRowModel,
  rowPaginationFeature,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  tableFeatures,
  useTable,
  type PaginationState,
  type SortingState,
} from "@tanstack/react-table";
import { useId, useMemo, useRef, useState } from "react";
import { ClipboardCheck, FilterX } from "lucide-react";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";
import { useShortcuts } from "@/features/shared/components/use-shortcuts";
import { ShortcutHelp, type Shortcut } from "./queue-shortcuts";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";

export interface QueueRow {
  id: string;
  species: string;
  groupName: string | null;
  agentName: string | null;
  concentration: number | null;
  unit: string | null;
  submittedAt: string | null;
  authorName: string;
  flags: { code: string; message: string }[];
  completeness: number | null;
  isMine: boolean;
  source: string;
}

const features = tableFeatures({
  rowSortingFeature,
  rowPaginationFeature,
  sortedRowModel: createSortedRowModel(),
  paginatedRowModel: createPaginatedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic },
});
const helper = createColumnHelper<typeof features, QueueRow>();
const empty: QueueRow[] = [];

export { flagLabels };

const columns = helper.columns([
  helper.accessor("species", {
    header: "Fish",
    sortFn: "alphanumeric",
    cell: (c) => (
      <Link href={`/review/${c.row.original.id}`} className="font-bold" data-row-link="">
        {c.getValue()}
      </Link>
    ),
  }),
  helper.accessor((r) => r.groupName ?? "—", { id: "group", header: "Group", sortFn: "alphanumeric" }),
  helper.accessor((r) => r.agentName ?? "—", { id: "agent", header: "Treatment", sortFn: "alphanumeric" }),
  helper.accessor((r) => r.concentration ?? -1, {
    id: "dose",
    header: "Dose",
    sortFn: "basic",
    cell: (c) =>
      c.row.original.concentration == null
        ? "—"
        : `${c.row.original.concentration.toFixed(c.row.original.concentration >= 10 ? 1 : 2)} ${c.row.original.unit}`,
  }),
  helper.accessor((r) => r.submittedAt ?? "", {
    id: "submitted",
    header: "Submitted",
    sortFn: "alphanumeric",
    cell: (c) => (c.getValue() ? formatDay(c.getValue()) : "—"),
  }),
  helper.accessor("authorName", {
    header: "Member",
    sortFn: "alphanumeric",
    cell: (c) => (
      <>
        {c.getValue()}
        {c.row.original.isMine ? " (you)" : ""}
      </>
    ),
  }),
  helper.accessor((r) => r.flags.length, {
    id: "flags",
    header: "Flags",
    sortFn: "basic",
    cell: (c) => (
      <ul className="flex flex-wrap gap-1">
        {c.row.original.flags.map((f) => (
          <li key={f.code} title={f.message} className="relative rounded bg-reed-100 px-1.5 text-xs">
            {flagLabels[f.code] ?? f.code}
            <span className="sr-only">: {f.message}</span>
          </li>
        ))}
      </ul>
    ),
  }),
  helper.accessor((r) => r.completeness ?? 0, {
    id: "completeness",
    header: "Complete",
    sortFn: "basic",
    cell: (c) => `${Math.round(c.getValue() * 100)} %`,
  }),
]);

const queueShortcuts: Shortcut[] = [
  { keys: ["j", "n"], does: "move to the next report in the list" },
  { keys: ["k", "p"], does: "move to the previous report" },
  { keys: ["Enter"], does: "open the report you are on" },
  { keys: ["?"], does: "show or hide this list" },
];

export function QueueTable() {
  const id = useId();
  const listRef = useRef<HTMLDivElement>(null);
  const [help, setHelp] = useState(false);
  // j/k move focus between the rows' report links, so Enter opens the one reached (a link's own behaviour).
  const move = (step: number) => {
    const links = [...(listRef.current?.querySelectorAll<HTMLAnchorElement>("a[data-row-link]") ?? [])];
    if (!links.length) return;
    const at = links.findIndex((a) => a === document.activeElement);
    const next = at < 0 ? (step > 0 ? 0 : links.length - 1) : Math.min(links.length - 1, Math.max(0, at + step));
    links[next]!.focus();
    links[next]!.scrollIntoView({ block: "nearest" });
  };
  useShortcuts({
    j: () => move(1),
    n: () => move(1),
    k: () => move(-1),
    p: () => move(-1),
    "?": () => setHelp((h) => !h),
    Escape: () => setHelp(false),
  });
  const query = useQuery({
    queryKey: ["review", "queue"],
    queryFn: () => fetchJson<{ reports: QueueRow[] }>("/api/review/queue"),
    refetchInterval: 60_000,
  });
  const [flag, setFlag] = useState("");
  const [agent, setAgent] = useState("");
  const [sorting, setSorting] = useState<SortingState>([{ id: "submitted", desc: false }]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 25 });
  const all = query.data?.reports ?? empty;
  const data = useMemo(
    () => all.filter((r) => (!flag || r.flags.some((f) => f.code === flag)) && (!agent || r.agentName === agent)),
    [all, flag, agent],
  );
  const agents = useMemo(() => [...new Set(all.map((r) => r.agentName).filter(Boolean))] as string[], [all]);
  const table = useTable({
    features,
    columns,
    data,
    state: { sorting, pagination },
    onSortingChange: setSorting,
    onPaginationChange: setPagination,
    enableMultiSort: false,
    getRowId: (r) => r.id,
  });
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-4">
        <div className="grid gap-1">
          <label htmlFor={`${id}-flag`} className="font-bold">
            Flag
          </label>
          <select
            id={`${id}-flag`}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
            value={flag}
            onChange={(e) => {
              setFlag(e.target.value);
              setPagination((p) => ({ ...p, pageIndex: 0 }));
            }}
          >
            <option value="">Any</option>
            {Object.entries(flagLabels).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
              </option>
            ))}
          </select>
        </div>
        <div className="grid gap-1">
          <label htmlFor={`${id}-agent`} className="font-bold">
            Treatment
          </label>
          <select
            id={`${id}-agent`}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
            value={agent}
            onChange={(e) => {
              setAgent(e.target.value);
              setPagination((p) => ({ ...p, pageIndex: 0 }));
            }}
          >
            <option value="">Any</option>
            {agents.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </div>
        <button
          type="button"
          className="rounded-md border border-peat-300 px-3 py-2"
          onClick={() => setSorting([{ id: "completeness", desc: true }])}
        >
          Most complete first
        </button>
        <button
          type="button"
          className="rounded-md border border-peat-300 px-3 py-2"
          onClick={() => setSorting([{ id: "submitted", desc: false }])}
        >
          Oldest first
        </button>
        <p aria-live="polite" className="text-sm text-peat-700">
          {query.isFetching ? "Loading…" : `${data.length} of ${all.length} awaiting review`}
        </p>
      </div>
      {query.isError ? (
        <p role="alert" className="font-bold text-alarm-700">
          {query.error instanceof ApiError ? query.error.message : "The queue could not be loaded."}
        </p>
      ) : null}
      <ShortcutHelp shortcuts={queueShortcuts} open={help} onToggle={() => setHelp((h) => !h)} />
      <div ref={listRef}>
        <TableView
          table={table}
          caption="Reports awaiting review"
          columnCount={columns.length}
          empty={
            query.isPending ? (
              <p className="py-8">Loading the queue…</p>
            ) : all.length ? (
              <EmptyState
                icon={<FilterX />}
                title="No waiting report matches these filters."
                action={
                  <button
                    type="button"
                    className={emptyQuietActionClass}
                    onClick={() => {
                      setFlag("");
                      setAgent("");
                    }}
                  >
                    Clear the filters
                  </button>
                }
              >
                {all.length} report{all.length === 1 ? " waits" : "s wait"} in all; the flag or treatment chosen above
                leaves none of them.
              </EmptyState>
            ) : (
              <EmptyState
                icon={<ClipboardCheck />}
                title="Nothing awaits review."
                action={
                  <Link href="/review/reports" className={emptyQuietActionClass}>
                    Browse all reports
                  </Link>
                }
              >
                Every submitted report has a decision. New ones appear here as members submit them; this list refreshes
                every minute.
              </EmptyState>
            )
          }
        />
      </div>
      <Pager table={table} label="Queue pages" page={pagination.pageIndex + 1} pages={table.getPageCount()} />
    </div>
  );
}
