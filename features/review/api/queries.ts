import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import { fetchJson } from "@/features/shared/fetch-json";
import type { AllReportsRow } from "../schemas";

export interface AllReportsFilters {
  status: string;
  group: string;
  agent: string;
  member: string;
  dateOf: "submitted" | "decided" | "started";
  from: string;
  to: string;
}

export interface AllReportsParams extends AllReportsFilters {
  sort: string;
  dir: "asc" | "desc";
  page: number;
  pageSize: number;
}

export const allReportsKeys = {
  all: ["reports", "all"] as const,
  list: (p: AllReportsParams) => ["reports", "all", p] as const,
};

/** The query string of GET /api/reports?scope=all for these filters (empty ones left out). */
export function allReportsSearch(p: AllReportsParams): URLSearchParams {
  const q = new URLSearchParams({
    scope: "all",
    sort: p.sort,
    dir: p.dir,
    page: String(p.page),
    pageSize: String(p.pageSize),
    dateOf: p.dateOf,
  });
  for (const k of ["status", "group", "agent", "member", "from", "to"] as const) if (p[k].trim()) q.set(k, p[k].trim());
  return q;
}

export function allReportsQuery(p: AllReportsParams) {
  return queryOptions({
    queryKey: allReportsKeys.list(p),
    queryFn: () =>
      fetchJson<{ reports: AllReportsRow[]; total: number; page: number; pageSize: number }>(
        `/api/reports?${allReportsSearch(p)}`,
      ),
    placeholderData: keepPreviousData,
  });
}
