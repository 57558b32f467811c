import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import { fetchJson } from "@/features/shared/fetch-json";
import type { ReportStatus } from "../schemas";

export interface MyReportRow {
  id: string;
  status: ReportStatus;
  startedOn: string | null;
  updatedAt: string;
  submittedAt: string | null;
  concentration: number | null;
  unit: string | null;
  species: string | null;
  agentName: string | null;
  courseOpen: boolean;
  source: string;
}

export interface MyReportsParams {
  status: string;
  sort: string;
  dir: "asc" | "desc";
  page: number;
  pageSize: number;
}

export const reportKeys = {
  all: ["reports"] as const,
  mine: (p: MyReportsParams) => ["reports", "mine", p] as const,
  one: (id: string) => ["reports", "one", id] as const,
};

export function myReportsQuery(p: MyReportsParams) {
  const q = new URLSearchParams({
    scope: "mine",
    sort: p.sort,
    dir: p.dir,
    page: String(p.page),
    pageSize: String(p.pageSize),
  });
  if (p.status) q.set("status", p.status);
  return queryOptions({
    queryKey: reportKeys.mine(p),
    queryFn: () => fetchJson<{ reports: MyReportRow[]; total: number }>(`/api/reports?${q}`),
    placeholderData: keepPreviousData,
  });
}
