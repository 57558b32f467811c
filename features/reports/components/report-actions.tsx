"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";

export function ReportActions({ id, status }: { id: string; status: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
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
      setError(
        err instanceof ApiError
          ? [err.message, ...(err.body.issues ?? []).map((i) => `${i.path}: ${i.message}`)].join(" ")
          : "That did not work; try again.",
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
        <p role="alert" className="font-bold text-alarm-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}
