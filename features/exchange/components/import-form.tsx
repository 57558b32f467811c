"use client";

import { useId, useState, type FormEvent } from "react";

interface Result {
  imported: number;
  rejected: { row: number; issues: { path: string; message: string }[] }[];
}

export function ImportForm() {
  const id = useId();
  const [file, setFile] = useState<File | null>(null);
  const [busy, setBusy] = useState(false);
  const [result, setResult] = useState<Result | null>(null);
  const [error, setError] = useState<string | null>(null);
  async function onSubmit(e: FormEvent) {
    e.preventDefault();
    if (!file) {
      setError("Choose a CSV file first.");
      return;
    }
    setBusy(true);
    setError(null);
    setResult(null);
    const res = await fetch("/api/import/reports", { method: "POST", headers: { "content-type": "text/csv" }, body: await file.text() });
    const body = await res.json();
    setBusy(false);
    if (res.ok) setResult(body);
    else setError([body.error?.message, ...(body.error?.issues ?? []).map((i: { message: string }) => i.message)].filter(Boolean).join(" "));
  }
  return (
    <form onSubmit={onSubmit} className="grid max-w-2xl gap-3 rounded-lg border border-peat-100 bg-white p-4" aria-label="Import reports">
      <label htmlFor={`${id}-file`} className="font-bold">CSV file with the columns of the reports export</label>
      <input id={`${id}-file`} type="file" accept=".csv,text/csv" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
      <p className="text-sm text-peat-700">Rows with status “accepted” count at once; other rows wait in the review queue. Rows with mistakes are listed and left out; nothing else changes.</p>
      <button type="submit" disabled={busy} className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white">{busy ? "Importing…" : "Import"}</button>
      {error ? <p role="alert" className="font-bold text-alarm-700">{error}</p> : null}
      {result ? (
        <div role="status" className="grid gap-2">
          <p className="font-bold">{result.imported} report{result.imported === 1 ? "" : "s"} imported; {result.rejected.length} row{result.rejected.length === 1 ? "" : "s"} left out.</p>
          {result.rejected.length ? (
            <ul className="list-disc pl-6 text-sm">
              {result.rejected.slice(0, 200).map((r) => <li key={r.row}>Row {r.row}: {r.issues.map((i) => `${i.path}: ${i.message}`).join("; ")}</li>)}
            </ul>
          ) : null}
        </div>
      ) : null}
    </form>
  );
}
