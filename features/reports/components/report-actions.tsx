"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";

export function ReportActions({ id, status }: { id: string; status: string }) {
  const router = useRouter();
  const [error, setError] = useState<{ message: string; items: string[] } | null>(null);
  const [busy, setBusy] = useState(false);
  if (status !== "draft" && status !== "returned") return null;
  async function run(path: string, method: string, then: string) {
    setBusy(true);
    setError(null);
    try {
      await fetchJson(path, { method });
      router.push(then);
      router.refresh();
    } catch (err) {
      // The messages are plain sentences; the field paths are for programs, not for the page.
      setError(
        err instanceof ApiError
          ? {
              message: err.message.replace(/ listed in issues/, " below").replace(/; see issues\.?$/, "."),
              items: (err.body.issues ?? []).map((i) => i.message),
            }
          : { message: "That did not work; try again.", items: [] },
      );
    } finally {
      setBusy(false);
    }
  }
  return (
    <div className="grid gap-2">
      <div className="flex flex-wrap gap-3">
        <Link
          href={`/reports/${id}/edit?step=0`}
          className="rounded-md border border-peat-500 px-4 py-2 font-bold no-underline"
        >
          Edit
        </Link>
        <button
          type="button"
          disabled={busy}
          onClick={() => run(`/api/reports/${id}/submit`, "POST", `/reports/${id}?submitted=1`)}
          className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white"
        >
          {status === "returned" ? "Resubmit for review" : "Submit for review"}
        </button>
        {status === "draft" ? (
          <button
            type="button"
            disabled={busy}
            onClick={() =>
              window.confirm("Delete this draft for good?") && run(`/api/reports/${id}`, "DELETE", "/reports")
            }
            className="rounded-md border border-alarm-500 px-4 py-2 text-alarm-700"
          >
            Delete draft
          </button>
        ) : null}
      </div>
      {error ? (
        <div role="alert" className="grid gap-1 text-alarm-700" data-testid="report-action-error">
          <p className="font-bold">{error.message}</p>
          {error.items.length ? (
            <ul className="list-disc pl-5 text-sm">
              {error.items.map((m) => (
                <li key={m}>{m}</li>
              ))}
            </ul>
          ) : null}
          {error.items.length ? (
            <Link href={`/reports/${id}/edit?step=0`} className="text-sm font-bold">
              Fill them in
            </Link>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
