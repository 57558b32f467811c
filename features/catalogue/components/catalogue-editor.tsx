"use client";

import { Pager, TableView } from "@/features/shared/components/table-parts";
import { Library, SearchX } from "lucide-react";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
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
import { useId, useMemo, useState, type FormEvent } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import type { CatalogueKind } from "../admin-schemas";

export interface FieldDef {
  name: string;
  label: string;
  type: "text" | "number" | "numbers" | "select" | "checkbox" | "nullable-number" | "nullable-text";
  options?: { value: string; label: string }[];
  /** Part of the key: set when adding, fixed afterwards. */
  key?: boolean;
  hint?: string;
}

type Item = Record<string, unknown> & { key: string; inUse: number; hidden?: boolean };

const features = tableFeatures({
  rowSortingFeature,
  rowPaginationFeature,
  sortedRowModel: createSortedRowModel(),
  paginatedRowModel: createPaginatedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic },
});
const helper = createColumnHelper<typeof features, Item>();
const empty: Item[] = [];

function toBody(fields: FieldDef[], values: Record<string, string | boolean>, editing: boolean) {
  const body: Record<string, unknown> = {};
  for (const f of fields) {
    if (editing && f.key) continue;
    const v = values[f.name];
    if (f.type === "checkbox") body[f.name] = Boolean(v);
    else if (f.type === "number") {
      if (String(v ?? "").trim() !== "") body[f.name] = Number(v);
    } else if (f.type === "nullable-number") body[f.name] = String(v ?? "").trim() === "" ? null : Number(v);
    else if (f.type === "nullable-text") body[f.name] = String(v ?? "").trim() === "" ? null : String(v);
    else if (f.type === "numbers")
      body[f.name] = String(v ?? "")
        .split(/[,\s]+/)
        .filter(Boolean)
        .map(Number);
    else if (String(v ?? "").trim() !== "" || !editing) body[f.name] = String(v ?? "");
  }
  return body;
}

export function CatalogueEditor({
  kind,
  title,
  fields,
  columns: shown,
  mergeTargets,
}: {
  kind: CatalogueKind;
  title: string;
  fields: FieldDef[];
  columns: string[];
  mergeTargets?: { value: string; label: string }[];
}) {
  const id = useId();
  const client = useQueryClient();
  const list = useQuery({
    queryKey: ["catalogue-admin", kind],
    queryFn: () => fetchJson<{ items: Item[] }>(`/api/admin/catalogue/${kind}`),
  });
  const [search, setSearch] = useState("");
  const [sorting, setSorting] = useState<SortingState>([]);
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 15 });
  const [editing, setEditing] = useState<Item | null>(null);
  const [values, setValues] = useState<Record<string, string | boolean>>({});
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [mergeInto, setMergeInto] = useState("");

  const all = list.data?.items ?? empty;
  const data = useMemo(() => {
    const q = search.trim().toLowerCase();
    return q ? all.filter((x) => JSON.stringify(x).toLowerCase().includes(q)) : all;
  }, [all, search]);

  const columns = useMemo(
    () =>
      helper.columns([
        ...shown.map((name) =>
          helper.accessor((r) => String(Array.isArray(r[name]) ? (r[name] as unknown[]).join(", ") : (r[name] ?? "")), {
            id: name,
            header: fields.find((f) => f.name === name)?.label ?? name,
            sortFn: "alphanumeric",
          }),
        ),
        helper.accessor((r) => r.inUse, { id: "inUse", header: "Reports", sortFn: "basic" }),
        helper.accessor((r) => (r.hidden ? "hidden" : "shown"), {
          id: "hidden",
          header: "Shown",
          sortFn: "alphanumeric",
        }),
        helper.display({
          id: "actions",
          header: "Actions",
          cell: (c) => (
            <button
              type="button"
              className="underline"
              onClick={() => {
                const item = c.row.original;
                setEditing(item);
                setErrors({});
                setMessage(null);
                setValues(
                  Object.fromEntries(
                    fields.map((f) => [
                      f.name,
                      f.type === "checkbox"
                        ? Boolean(item[f.name])
                        : Array.isArray(item[f.name])
                          ? (item[f.name] as unknown[]).join(", ")
                          : item[f.name] == null
                            ? ""
                            : String(item[f.name]),
                    ]),
                  ),
                );
              }}
            >
              Edit
            </button>
          ),
        }),
      ]),
    [shown, fields],
  );
  const table = useTable({
    features,
    columns,
    data,
    state: { sorting, pagination },
    onSortingChange: setSorting,
    onPaginationChange: setPagination,
    getRowId: (r) => r.key,
  });

  const done = (text: string) => {
    setMessage({ ok: true, text });
    setErrors({});
    return client.invalidateQueries({ queryKey: ["catalogue-admin", kind] });
  };
  const fail = (err: unknown) => {
    if (err instanceof ApiError) {
      setErrors(Object.fromEntries((err.body.issues ?? []).map((i) => [i.path.split(".")[0]!, i.message])));
      setMessage({ ok: false, text: err.message });
    } else setMessage({ ok: false, text: "That did not go through; try again." });
  };
  const save = useMutation({
    mutationFn: () =>
      editing
        ? fetchJson(`/api/admin/catalogue/${kind}/${encodeURIComponent(editing.key)}`, {
            method: "PATCH",
            body: JSON.stringify(toBody(fields, values, true)),
          })
        : fetchJson(`/api/admin/catalogue/${kind}`, {
            method: "POST",
            body: JSON.stringify(toBody(fields, values, false)),
          }),
    onSuccess: () => done(editing ? "Saved." : "Added."),
    onError: fail,
  });
  const remove = useMutation({
    mutationFn: () =>
      fetchJson(`/api/admin/catalogue/${kind}/${encodeURIComponent(editing!.key)}`, { method: "DELETE" }),
    onSuccess: () => {
      setEditing(null);
      return done("Deleted.");
    },
    onError: fail,
  });
  const merge = useMutation({
    mutationFn: () =>
      fetchJson(`/api/admin/catalogue/species/${encodeURIComponent(editing!.key)}/merge`, {
        method: "POST",
        body: JSON.stringify({ into: mergeInto, note: `Merged by an admin from the catalogue page.` }),
      }),
    onSuccess: () => {
      setEditing(null);
      return done("Merged: its reports now count for the other species.");
    },
    onError: fail,
  });

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    save.mutate();
  };
  return (
    <section className="grid gap-4" aria-labelledby={`${id}-title`}>
      <h2 id={`${id}-title`} className="text-2xl font-bold text-peat-900">
        {title}
      </h2>
      <div className="flex flex-wrap items-end gap-4">
        <div className="grid gap-1">
          <label htmlFor={`${id}-search`} className="font-bold">
            Find
          </label>
          <input
            id={`${id}-search`}
            value={search}
            onChange={(e) => {
              setSearch(e.target.value);
              setPagination((p) => ({ ...p, pageIndex: 0 }));
            }}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          />
        </div>
        <button
          type="button"
          className="rounded-md border border-peat-500 px-4 py-2 font-bold"
          onClick={() => {
            setEditing(null);
            setValues({});
            setErrors({});
            setMessage(null);
          }}
        >
          Add new
        </button>
        <p aria-live="polite" className="text-sm text-peat-700">
          {list.isFetching ? "Loading…" : `${data.length} entries`}
        </p>
      </div>
      <TableView
        table={table}
        caption={title}
        columnCount={columns.length}
        small
        empty={
          list.isPending ? (
            <p className="py-8">Loading…</p>
          ) : all.length ? (
            <EmptyState
              icon={<SearchX />}
              title={`No entry matches “${search.trim()}”.`}
              action={
                <button type="button" className={emptyQuietActionClass} onClick={() => setSearch("")}>
                  Clear the search
                </button>
              }
            >
              The search looks through every field of the {all.length} entries in this list.
            </EmptyState>
          ) : (
            <EmptyState
              icon={<Library />}
              title="This list is empty."
              action={
                <a href={`#${id}-form`} className={emptyQuietActionClass}>
                  Add the first entry
                </a>
              }
            >
              Members cannot choose from it when they report until it has entries; add one with the form below.
            </EmptyState>
          )
        }
      />
      <Pager table={table} label={`${title} pages`} page={pagination.pageIndex + 1} pages={table.getPageCount()} />

      <form
        id={`${id}-form`}
        onSubmit={onSubmit}
        className="grid max-w-2xl gap-3 rounded-lg border border-peat-100 bg-white p-4"
        aria-label={editing ? `Edit ${editing.key}` : `Add to ${title}`}
      >
        <h3 className="text-lg font-bold">{editing ? `Edit “${editing.key}”` : "Add a new entry"}</h3>
        {fields.map((f) => {
          const fid = `${id}-${f.name}`;
          const disabled = Boolean(editing && f.key);
          const v = values[f.name];
          return (
            <div key={f.name} className="grid gap-1">
              {f.type === "checkbox" ? (
                <label className="flex items-center gap-2">
                  <input
                    type="checkbox"
                    id={fid}
                    checked={Boolean(v)}
                    onChange={(e) => setValues({ ...values, [f.name]: e.target.checked })}
                  />{" "}
                  {f.label}
                </label>
              ) : (
                <>
                  <label htmlFor={fid} className="font-bold">
                    {f.label}
                  </label>
                  {f.hint ? <p className="text-sm text-peat-700">{f.hint}</p> : null}
                  {f.type === "select" ? (
                    <select
                      id={fid}
                      disabled={disabled}
                      value={String(v ?? "")}
                      onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                      className="rounded-md border border-peat-300 bg-white px-3 py-2"
                    >
                      <option value="">Choose…</option>
                      {f.options?.map((o) => (
                        <option key={o.value} value={o.value}>
                          {o.label}
                        </option>
                      ))}
                    </select>
                  ) : (
                    <input
                      id={fid}
                      disabled={disabled}
                      value={String(v ?? "")}
                      inputMode={f.type === "text" || f.type === "nullable-text" ? undefined : "decimal"}
                      onChange={(e) => setValues({ ...values, [f.name]: e.target.value })}
                      aria-invalid={errors[f.name] ? true : undefined}
                      className="rounded-md border border-peat-300 bg-white px-3 py-2 disabled:bg-peat-50"
                    />
                  )}
                </>
              )}
              {errors[f.name] ? <p className="text-sm font-bold text-alarm-700">{errors[f.name]}</p> : null}
            </div>
          );
        })}
        {message ? (
          <p
            role={message.ok ? "status" : "alert"}
            className={message.ok ? "font-bold text-peat-700" : "font-bold text-alarm-700"}
          >
            {message.text}
          </p>
        ) : null}
        <div className="flex flex-wrap gap-3">
          <button
            type="submit"
            disabled={save.isPending}
            className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white"
          >
            {editing ? "Save changes" : "Add"}
          </button>
          {editing ? (
            <button
              type="button"
              disabled={remove.isPending}
              onClick={() =>
                window.confirm(`Delete “${editing.key}”? Entries in use cannot be deleted; hide them instead.`) &&
                remove.mutate()
              }
              className="rounded-md border border-alarm-500 px-4 py-2 text-alarm-700"
            >
              Delete
            </button>
          ) : null}
        </div>
        {editing && kind === "species" && mergeTargets ? (
          <div className="grid gap-2 border-t border-peat-100 pt-3">
            <label htmlFor={`${id}-merge`} className="font-bold">
              Merge into another species (its reports move there; this one is hidden)
            </label>
            <select
              id={`${id}-merge`}
              value={mergeInto}
              onChange={(e) => setMergeInto(e.target.value)}
              className="rounded-md border border-peat-300 bg-white px-3 py-2"
            >
              <option value="">Choose…</option>
              {mergeTargets
                .filter((t) => t.value !== editing.key)
                .map((t) => (
                  <option key={t.value} value={t.value}>
                    {t.label}
                  </option>
                ))}
            </select>
            <button
              type="button"
              disabled={!mergeInto || merge.isPending}
              onClick={() => merge.mutate()}
              className="justify-self-start rounded-md border border-peat-500 px-4 py-2"
            >
              Merge
            </button>
          </div>
        ) : null}
      </form>
    </section>
  );
}
