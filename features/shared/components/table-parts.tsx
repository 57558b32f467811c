"use client";

import type { ReactNode } from "react";

/**
 * The markup every Tanklore table shares: sortable column headers with aria-sort, the body with an
 * empty state, and a pager. Tables stay headless (TanStack Table); these only render.
 */
// The table's generic types differ per table; these helpers use only methods every table has.
type AnyTable = {
  getHeaderGroups: () => { id: string; headers: AnyHeader[] }[];
  getRowModel: () => { rows: { id: string; getAllCells: () => { id: string }[] }[] };
  FlexRender: (props: { header?: unknown; cell?: unknown }) => ReactNode;
  getCanPreviousPage: () => boolean;
  getCanNextPage: () => boolean;
  previousPage: () => void;
  nextPage: () => void;
};
type AnyHeader = { id: string; column: { getIsSorted: () => false | "asc" | "desc"; getCanSort: () => boolean; getToggleSortingHandler: () => ((e: unknown) => void) | undefined } };

export function TableView({ table, caption, empty, columnCount, small }: { table: unknown; caption: string; empty: ReactNode; columnCount: number; small?: boolean }) {
  const t = table as AnyTable;
  const rows = t.getRowModel().rows;
  return (
    <div className="overflow-x-auto rounded-lg border border-peat-100 bg-white">
      <table className={small ? "w-full text-left text-sm" : "w-full text-left"}>
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-peat-50">
          {t.getHeaderGroups().map((g) => (
            <tr key={g.id}>
              {g.headers.map((h) => {
                const sorted = h.column.getIsSorted();
                const canSort = h.column.getCanSort();
                return (
                  <th key={h.id} scope="col" className="px-3 py-2" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : canSort ? "none" : undefined}>
                    {canSort ? (
                      <button type="button" className="font-bold" onClick={h.column.getToggleSortingHandler()}>
                        <t.FlexRender header={h} />
                        <span aria-hidden="true">{sorted === "asc" ? " ▲" : sorted === "desc" ? " ▼" : ""}</span>
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
        <tbody>
          {rows.length === 0 ? (
            <tr>
              <td colSpan={columnCount} className="px-3 py-8 text-center text-peat-700">{empty}</td>
            </tr>
          ) : (
            rows.map((row) => (
              <tr key={row.id} className="border-t border-peat-100 align-top">
                {row.getAllCells().map((cell) => (
                  <td key={cell.id} className={small ? "px-3 py-1.5" : "px-3 py-2"}>
                    <t.FlexRender cell={cell} />
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
      <button type="button" className="rounded border border-peat-300 px-3 py-1 disabled:opacity-40" disabled={!t.getCanPreviousPage()} onClick={() => t.previousPage()}>
        Previous
      </button>
      <span>
        Page {page} of {Math.max(1, pages)}
      </span>
      <button type="button" className="rounded border border-peat-300 px-3 py-1 disabled:opacity-40" disabled={!t.getCanNextPage()} onClick={() => t.nextPage()}>
        Next
      </button>
    </nav>
  );
}
