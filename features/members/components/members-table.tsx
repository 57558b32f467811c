"use client";

import { Pager, TableView } from "@/features/shared/components/table-parts";
import { useServerTable } from "@/features/shared/components/use-server-table";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import {
  createColumnHelper,
  rowPaginationFeature,
  rowSortingFeature,
  tableFeatures,
  useTable,
} from "@tanstack/react-table";
import { useRouter } from "next/navigation";
import { useDeferredValue, useId, useState } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { Select, TextInput } from "@/features/shared/components/ui";
import { roles, type Role } from "@/features/shared/roles";
import { memberKeys, membersQuery } from "../api/queries";
import type { Member } from "../schemas";
import { SearchX } from "lucide-react";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";

const features = tableFeatures({ rowSortingFeature, rowPaginationFeature });
const helper = createColumnHelper<typeof features, Member>();
const emptyRows: Member[] = [];

const roleWords: Record<Role, string> = { member: "member", moderator: "moderator", admin: "admin" };

/** Choosing a role only proposes it (arrow keys move through the menu freely); a confirm step changes it. */
function RoleSelect({ member }: { member: Member }) {
  const client = useQueryClient();
  const router = useRouter();
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState<Role | null>(null);
  const change = useMutation({
    mutationFn: (role: Role) =>
      fetchJson(`/api/admin/members/${member.id}`, { method: "PATCH", body: JSON.stringify({ role }) }),
    onSuccess: () => {
      setError(null);
      setPending(null);
      // The server-rendered list of recent role changes below the table shows the new change too.
      router.refresh();
      return client.invalidateQueries({ queryKey: memberKeys.all });
    },
    onError: (err) => setError(err instanceof ApiError ? err.message : "The role could not be changed."),
  });
  const proposed = pending && pending !== member.role ? pending : null;
  return (
    <div>
      <Select
        aria-label={`Role of ${member.name}`}
        value={proposed ?? member.role}
        disabled={change.isPending}
        aria-describedby={proposed ? `${id}-confirm` : undefined}
        onChange={(e) => {
          setError(null);
          setPending(e.target.value as Role);
        }}
      >
        {roles.map((r) => (
          <option key={r} value={r}>
            {roleWords[r] ?? r}
          </option>
        ))}
      </Select>
      {proposed ? (
        <div className="mt-1 flex flex-wrap items-center gap-2 text-sm" id={`${id}-confirm`} data-testid="role-confirm">
          <span>
            Make {member.name} {proposed === "admin" ? "an" : "a"} {roleWords[proposed] ?? proposed} (now{" "}
            {roleWords[member.role as Role] ?? member.role})?
          </span>
          <button
            type="button"
            disabled={change.isPending}
            onClick={() => change.mutate(proposed)}
            className="rounded-md bg-peat-700 px-2 py-1 font-bold text-white"
          >
            {change.isPending ? "Changing…" : "Change role"}
          </button>
          <button
            type="button"
            disabled={change.isPending}
            onClick={() => {
              setPending(null);
              setError(null);
            }}
            className="rounded-md border border-peat-500 px-2 py-1"
          >
            Cancel
          </button>
        </div>
      ) : null}
      {error ? (
        <p role="alert" className="mt-1 text-sm text-alarm-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

const columns = helper.columns([
  helper.accessor("name", { header: "Name", cell: (c) => c.getValue() }),
  helper.accessor("email", { header: "E-mail", cell: (c) => c.getValue() }),
  helper.accessor("role", { header: "Role", cell: (c) => <RoleSelect member={c.row.original} /> }),
  helper.accessor("emailVerified", {
    header: "Address confirmed",
    enableSorting: false,
    cell: (c) => (c.getValue() ? "yes" : "not yet"),
  }),
  helper.accessor("createdAt", {
    header: "Joined",
    cell: (c) =>
      new Date(c.getValue()).toLocaleDateString("en-GB", { year: "numeric", month: "short", day: "numeric" }),
  }),
]);

export function MembersTable() {
  const id = useId();
  const [q, setQ] = useState("");
  const [role, setRole] = useState("");
  const server = useServerTable([{ id: "name", desc: false }]);
  const { pagination } = server;
  const deferredQ = useDeferredValue(q);
  const query = useQuery(membersQuery({ q: deferredQ.trim(), role, ...server.request }));
  const table = useTable({
    features,
    columns,
    data: query.data?.members ?? emptyRows,
    rowCount: query.data?.total ?? 0,
    ...server.options,
    getRowId: (row) => row.id,
  });
  const total = query.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / pagination.pageSize));
  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-4" role="search">
        <div className="flex flex-col gap-1">
          <label htmlFor={`${id}-q`} className="font-bold">
            Find a member
          </label>
          <TextInput
            id={`${id}-q`}
            value={q}
            placeholder="Name or e-mail"
            onChange={(e) => {
              setQ(e.target.value);
              server.firstPage();
            }}
          />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor={`${id}-role`} className="font-bold">
            Role
          </label>
          <Select
            id={`${id}-role`}
            value={role}
            onChange={(e) => {
              setRole(e.target.value);
              server.firstPage();
            }}
          >
            <option value="">Any role</option>
            {roles.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </Select>
        </div>
        <p className="text-sm text-peat-700" aria-live="polite">
          {query.isFetching ? "Loading…" : `${total} member${total === 1 ? "" : "s"}`}
        </p>
      </div>
      {query.isError ? (
        <p role="alert" className="font-bold text-alarm-700">
          {query.error instanceof ApiError ? query.error.message : "The member list could not be loaded."}
        </p>
      ) : null}
      <TableView
        table={table}
        caption="Club members, sortable by column"
        empty={
          query.isPending ? (
            <p className="py-8">Loading members…</p>
          ) : (
            <EmptyState
              icon={<SearchX />}
              title="No member matches."
              action={
                <button
                  type="button"
                  className={emptyQuietActionClass}
                  onClick={() => {
                    setQ("");
                    setRole("");
                    server.firstPage();
                  }}
                >
                  Clear the search
                </button>
              }
            >
              {q || role
                ? "No name or e-mail address fits the search and role chosen above."
                : "Nobody has joined the club yet."}
            </EmptyState>
          )
        }
        columnCount={columns.length}
      />
      <Pager table={table} label="Member list pages" page={pagination.pageIndex + 1} pages={pages} />
    </div>
  );
}
