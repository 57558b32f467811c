import { keepPreviousData, queryOptions } from "@tanstack/react-query";
import { fetchJson } from "@/features/shared/fetch-json";
import type { MemberList } from "../schemas";

export interface MembersParams {
  q: string;
  role: string;
  sort: string;
  dir: "asc" | "desc";
  page: number;
  pageSize: number;
}

export const memberKeys = {
  all: ["members"] as const,
  list: (p: MembersParams) => ["members", "list", p] as const,
};

export function membersQuery(p: MembersParams) {
  const search = new URLSearchParams({ sort: p.sort, dir: p.dir, page: String(p.page), pageSize: String(p.pageSize) });
  if (p.q) search.set("q", p.q);
  if (p.role) search.set("role", p.role);
  return queryOptions({
    queryKey: memberKeys.list(p),
    queryFn: () => fetchJson<MemberList>(`/api/admin/members?${search}`),
    placeholderData: keepPreviousData,
  });
}
