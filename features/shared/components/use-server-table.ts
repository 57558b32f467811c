"use client";

import { useState } from "react";
import type { PaginationState, SortingState, Updater } from "@tanstack/react-table";

/**
 * Sorting and paging done by the server: the table's controlled state, the request parameters it
 * implies, and a way back to page one (after a new sort or filter).
 */
export function useServerTable(initialSort: SortingState, pageSize = 20) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize });
  const firstPage = () => setPagination((p) => ({ ...p, pageIndex: 0 }));
  const sort = sorting[0] ?? initialSort[0];
  return {
    options: {
      state: { sorting, pagination },
      onSortingChange: (u: Updater<SortingState>) => {
        setSorting(u);
        firstPage();
      },
      onPaginationChange: setPagination,
      manualSorting: true,
      manualPagination: true,
      enableMultiSort: false,
    },
    request: {
      sort: sort?.id ?? "",
      dir: (sort?.desc ? "desc" : "asc") as "asc" | "desc",
      page: pagination.pageIndex + 1,
      pageSize: pagination.pageSize,
    },
    pagination,
    firstPage,
  };
}
