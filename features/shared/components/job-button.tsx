"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, fetchJson } from "../fetch-json";
import { Button } from "./ui";

/**
 * Runs a round now ({ run: kind }) or queues a failed job again ({ retry: id }) through POST /api/admin/jobs,
 * then reloads the page's figures. The outcome is announced next to the button.
 */
export function JobButton({
  action,
  label,
  what,
}: {
  action: { run: string } | { retry: string };
  label: string;
  /** Which work the button acts on, for screen readers (the row shows it to everyone else). */
  what: string;
}) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [said, setSaid] = useState<{ ok: boolean; text: string } | null>(null);
  async function go() {
    setBusy(true);
    setSaid(null);
    try {
      await fetchJson("/api/admin/jobs", { method: "POST", body: JSON.stringify(action) });
      setSaid({ ok: true, text: "run" in action ? "Done." : "Queued again." });
      router.refresh();
    } catch (err) {
      setSaid({
        ok: false,
        text:
          err instanceof ApiError
            ? [err.message, ...(err.body.issues ?? []).map((i) => i.message)].join(" ")
            : "That did not work; try again.",
      });
    } finally {
      setBusy(false);
    }
  }
  return (
    <span className="inline-flex flex-wrap items-center gap-2">
      <Button type="button" variant="quiet" disabled={busy} onClick={go} className="whitespace-nowrap">
        {busy ? "Working…" : label}
        <span className="sr-only">: {what}</span>
      </Button>
      <span aria-live="polite" className={said?.ok === false ? "text-sm font-bold text-alarm-700" : "text-sm"}>
        {said?.text}
      </span>
    </span>
  );
}
