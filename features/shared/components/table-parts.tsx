"use client";

import { ArrowDown, ArrowUp, ChevronLeft, ChevronRight, ChevronsUpDown } from "lucide-react";
import type { ReactNode } from "react";

/**
 * The markup every Tanklore table shares: sortable column headers with aria-sort, the body with an
 * empty state, and a pager. Tables stay headless (TanStack Table); these only render.
 * Under 640 px the same table restyles into stacked cards: each row a card, each cell labelled with its column's
 * header (data-label), the sortable headers a row of sort buttons. One DOM for both, so nothing is rendered twice.
 */
// The table's generic types differ per table; these helpers use only methods every table has.
type AnyTable = {
  getHeaderGroups: () => { id: string; headers: AnyHeader[] }[];
  getRowModel: () => {
    rows: { id: string; getAllCells: () => { id: string; column: { columnDef: { header?: unknown } } }[] }[];
  };
  FlexRender: (props: { header?: unknown; cell?: unknown }) => ReactNode;
  getCanPreviousPage: () => boolean;
  getCanNextPage: () => boolean;
  previousPage: () => void;
  nextPage: () => void;
};
type AnyHeader = {
  id: string;
  column: {
    getIsSorted: () => false | "asc" | "desc";
    getCanSort: () => boolean;
    getToggleSortingHandler: () => ((e: unknown) => void) | undefined;
  };
};

const label = (header: unknown) => (typeof header === "string" ? header : undefined);

export function TableView({
  table,
  caption,
  empty,
  columnCount,
  small,
}: {
  table: unknown;
  caption: string;
  empty: ReactNode;
  columnCount: number;
  small?: boolean;
}) {
  const t = table as AnyTable;
  const rows = t.getRowModel().rows;
  return (
    <div className="sm:overflow-x-auto sm:rounded-lg sm:border sm:border-peat-100 sm:bg-white" data-testid="table-view">
      <table className={`${small ? "text-sm" : ""} w-full text-left max-sm:block`}>
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-peat-50 max-sm:block max-sm:bg-transparent">
          {t.getHeaderGroups().map((g) => (
            <tr key={g.id} className="max-sm:flex max-sm:flex-wrap max-sm:items-center max-sm:gap-2 max-sm:pb-3">
              {g.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                const canSort = h.column.getCanSort();
                const Arrow = sorted === "asc" ? ArrowUp : sorted === "desc" ? ArrowDown : ChevronsUpDown;
                return (
                  <th
                    key={h.id}
                    scope="col"
                    className={`px-3 py-2 max-sm:p-0 ${canSort ? "max-sm:block" : "max-sm:hidden"}`}
                    aria-sort={
                      sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : canSort ? "none" : undefined
                    }
                  >
                    {canSort ? (
                      <button
                        type="button"
                        className="inline-flex items-center gap-1 font-bold max-sm:rounded-md max-sm:border max-sm:border-peat-300 max-sm:bg-white max-sm:px-2 max-sm:py-1 max-sm:text-sm"
                        onClick={h.column.getToggleSortingHandler()}
                      >
                        <t.FlexRender header={h} />
                        <Arrow className={`h-4 w-4 ${sorted ? "" : "text-peat-500"}`} aria-hidden="true" />
                      </button>
                    ) : (
                      <t.FlexRender header={h} />
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody className="max-sm:grid max-sm:gap-3">
          {rows.length === 0 ? (
            <tr className="max-sm:block max-sm:rounded-lg max-sm:border max-sm:border-peat-100 max-sm:bg-white">
              <td colSpan={columnCount} className="px-3 text-center text-peat-700 max-sm:block">
                {empty}
              </td>
            </tr>
          ) : (
            rows.map((row) => (
              <tr
                key={row.id}
                className="border-t border-peat-100 align-top focus-within:bg-peat-50 max-sm:grid max-sm:gap-1.5 max-sm:rounded-lg max-sm:border max-sm:bg-white max-sm:p-3"
                data-testid="table-row"
              >
                {row.getAllCells().map((cell) => (
                  <td
                    key={cell.id}
                    data-label={label(cell.column.columnDef.header)}
                    className={`${small ? "px-3 py-1.5" : "px-3 py-2"} max-sm:grid max-sm:grid-cols-[minmax(6rem,35%)_minmax(0,1fr)] max-sm:gap-2 max-sm:p-0 max-sm:before:font-bold max-sm:before:text-peat-700 max-sm:before:content-[attr(data-label)]`}
                  >
                    <div className="min-w-0 break-words">
                      <t.FlexRender cell={cell} />
                    </div>
                  </td>
                ))}
              </tr>
            ))
          )}
        </tbody>
      </table>
    </div>
  );
}

export function Pager({ table, label, page, pages }: { table: unknown; label: string; page: number; pages: number }) {
  const t = table as AnyTable;
  return (
    <nav aria-label={label} className="flex items-center gap-3">
      <button
        type="button"
        className="inline-flex items-center gap-1 rounded border border-peat-300 bg-white px-3 py-1 disabled:opacity-40"
        disabled={!t.getCanPreviousPage()}
        onClick={() => t.previousPage()}
      >
        <ChevronLeft className="h-4 w-4" aria-hidden="true" />
        Previous
      </button>
      <span>
        Page {page} of {Math.max(1, pages)}
      </span>
      <button
        type="button"
        className="inline-flex items-center gap-1 rounded border border-peat-300 bg-white px-3 py-1 disabled:opacity-40"
        disabled={!t.getCanNextPage()}
        onClick={() => t.nextPage()}
      >
        Next
        <ChevronRight className="h-4 w-4" aria-hidden="true" />
      </button>
    </nav>
  );
}
