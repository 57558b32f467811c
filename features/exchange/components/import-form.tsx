"use client";

import { useId, useState, type FormEvent } from "react";

interface Rejected {
  row: number;
  issues: { path: string; message: string }[];
}

interface Result {
  imported: number;
  skipped: number;
  rejected: Rejected[];
  dryRun?: boolean;
}

interface Progress {
  phase: "checking" | "writing";
  done: number;
  total: number;
}

type Outcome = { result: Result } | { error: string; rejected?: Rejected[] };

/** Sends the file and reads the streamed answer: progress lines, then the result or the error envelope. */
async function send(text: string, query: string, onProgress: (p: Progress) => void): Promise<Outcome> {
  const res = await fetch(`/api/import/reports${query}`, {
    method: "POST",
    headers: { "content-type": "text/csv", accept: "application/x-ndjson" },
    body: text,
  });
  const envelope = (body: {
    error?: { message?: string; issues?: { message: string }[] };
    rejected?: Rejected[];
  }): Outcome => ({
    error:
      [body.error?.message, ...(body.rejected ? [] : (body.error?.issues ?? []).map((i) => i.message))]
        .filter(Boolean)
        .join(" ") || "The import failed; nothing was changed.",
    rejected: body.rejected,
  });
  if (!res.ok || !res.body) return envelope(await res.json().catch(() => ({})));
  const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
  let buffer = "";
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    buffer += value;
    const lines = buffer.split("\n");
    buffer = lines.pop() ?? "";
    for (const line of lines.filter(Boolean)) {
      const m = JSON.parse(line);
      if (m.progress) onProgress(m.progress);
      else if (m.result) return { result: m.result };
      else if (m.error) return envelope(m);
    }
  }
  return {
    error:
      "The connection ended before the import finished. Check the file again: rows already imported are counted as skipped.",
  };
}

function RejectedList({ rows }: { rows: Rejected[] }) {
  if (!rows.length) return null;
  return (
    <div className="grid gap-1">
      <p className="font-bold">Rows to fix (row 1 is the header):</p>
      <ul className="max-h-72 list-disc overflow-y-auto pl-6 text-sm">
        {rows.slice(0, 200).map((r) => (
          <li key={r.row}>
            Row {r.row}: {r.issues.map((i) => `${i.path}: ${i.message}`).join("; ")}
          </li>
        ))}
      </ul>
      {rows.length > 200 ? <p className="text-sm">…and {rows.length - 200} more.</p> : null}
    </div>
  );
}

export function ImportForm() {
  const id = useId();
  const [file, setFile] = useState<File | null>(null);
  const [busy, setBusy] = useState<"checking" | "importing" | null>(null);
  const [progress, setProgress] = useState<Progress | null>(null);
  const [preview, setPreview] = useState<Result | null>(null);
  const [partial, setPartial] = useState(false);
  const [result, setResult] = useState<Result | null>(null);
  const [error, setError] = useState<{ message: string; rejected?: Rejected[] } | null>(null);

  async function run(dryRun: boolean) {
    if (!file) {
      setError({ message: "Choose a CSV file first." });
      return;
    }
    setBusy(dryRun ? "checking" : "importing");
    setError(null);
    setResult(null);
    setProgress(null);
    const query = dryRun ? "?dryRun=1" : partial ? "?partial=1" : "";
    const outcome = await send(await file.text(), query, setProgress).catch(
      () => ({ error: "The server could not be reached; nothing was changed." }) as Outcome,
    );
    setBusy(null);
    setProgress(null);
    if ("error" in outcome) setError({ message: outcome.error, rejected: outcome.rejected });
    else if (dryRun) setPreview(outcome.result);
    else {
      setResult(outcome.result);
      setPreview(null);
    }
  }

  function onCheck(e: FormEvent) {
    e.preventDefault();
    void run(true);
  }

  const blocked = preview ? preview.rejected.length > 0 && !partial : true;
  return (
    <form
      onSubmit={onCheck}
      className="grid min-w-0 max-w-2xl grid-cols-1 gap-3 rounded-lg border border-peat-100 bg-white p-4"
      aria-label="Import reports"
    >
      <label htmlFor={`${id}-file`} className="font-bold">
        CSV file with the columns of the reports export
      </label>
      <input
        id={`${id}-file`}
        type="file"
        accept=".csv,text/csv"
        className="w-full min-w-0 max-w-full"
        onChange={(e) => {
          setFile(e.target.files?.[0] ?? null);
          setPreview(null);
          setResult(null);
          setError(null);
          setPartial(false);
        }}
      />
      <p className="text-sm text-peat-700">
        Reports keep the status and review history in the file; accepted ones count at once. A report already here (the
        same id, or without an id the same content and reporter) is skipped, so importing a file twice changes nothing.
        Check the file first: nothing is written until you import.
      </p>
      <button
        type="submit"
        disabled={busy !== null || !file}
        className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:opacity-60"
      >
        {busy === "checking" ? "Checking…" : "Check file"}
      </button>

      {progress ? (
        <div role="status" className="grid gap-1">
          <label htmlFor={`${id}-progress`}>
            {progress.phase === "checking" ? "Checking rows" : "Importing reports"}: {progress.done.toLocaleString()} of{" "}
            {progress.total.toLocaleString()}
          </label>
          <progress id={`${id}-progress`} value={progress.done} max={Math.max(progress.total, 1)} className="w-full" />
        </div>
      ) : null}

      {preview && !busy ? (
        <section aria-label="Preview of the import" className="grid gap-2 rounded-md border border-peat-100 p-3">
          <p className="font-bold">
            Preview: {preview.imported} report{preview.imported === 1 ? "" : "s"} to import; {preview.skipped} already
            here (skipped); {preview.rejected.length} row{preview.rejected.length === 1 ? "" : "s"} to fix.
          </p>
          <RejectedList rows={preview.rejected} />
          {preview.rejected.length ? (
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={partial} onChange={(e) => setPartial(e.target.checked)} />
              Import the good rows and leave the rows to fix out (otherwise fix the file and check it again)
            </label>
          ) : null}
          <button
            type="button"
            onClick={() => void run(false)}
            disabled={blocked || preview.imported === 0}
            className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:opacity-60"
          >
            Import {preview.imported} report{preview.imported === 1 ? "" : "s"}
          </button>
        </section>
      ) : null}

      {error ? (
        <div role="alert" className="grid gap-1">
          <p className="font-bold text-alarm-700">{error.message}</p>
          {error.rejected ? <RejectedList rows={error.rejected} /> : null}
        </div>
      ) : null}
      {result ? (
        <p role="status" className="font-bold">
          Done: {result.imported} report{result.imported === 1 ? "" : "s"} imported; {result.skipped} already here
          (skipped); {result.rejected.length} row
          {result.rejected.length === 1 ? "" : "s"} left out.
        </p>
      ) : null}
    </form>
  );
}
