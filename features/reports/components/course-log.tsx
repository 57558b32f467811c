"use client";

import { useRouter } from "next/navigation";
import { useId, useState, type FormEvent } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";

export interface CourseEntryView {
  id: number;
  kind: "dose" | "observation";
  at: string;
  amountMl: number | null;
  text: string | null;
  photoId: string | null;
}

function localNow(): string {
  const d = new Date();
  return new Date(d.getTime() - d.getTimezoneOffset() * 60000).toISOString().slice(0, 16);
}

export function CourseLog({ reportId, entries, open }: { reportId: string; entries: CourseEntryView[]; open: boolean }) {
  const router = useRouter();
  const id = useId();
  const [kind, setKind] = useState<"dose" | "observation">("dose");
  const [at, setAt] = useState(localNow);
  const [amount, setAmount] = useState("");
  const [text, setText] = useState("");
  const [photo, setPhoto] = useState<File | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      let photoId: string | undefined;
      if (kind === "observation" && photo) {
        // The photo joins the report first (the same checks as any photo), then the observation points at it.
        const form = new FormData();
        form.set("file", photo);
        form.set("stage", "during");
        const res = await fetch(`/api/reports/${reportId}/photos`, { method: "POST", body: form });
        const body = await res.json();
        if (!res.ok) throw new ApiError(res.status, body.error);
        photoId = body.id;
      }
      await fetchJson(`/api/reports/${reportId}/entries`, {
        method: "POST",
        body: JSON.stringify({ kind, at: new Date(at).toISOString(), ...(kind === "dose" ? { amountMl: Number(amount.replace(",", ".")) || undefined } : { text: text.trim() || undefined, photoId }) }),
      });
      setAmount("");
      setText("");
      setPhoto(null);
      setAt(localNow());
      router.refresh();
    } catch (err) {
      setError(err instanceof ApiError ? [err.message, ...(err.body.issues ?? []).map((i) => i.message)].join(" ") : "The entry could not be saved; try again.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <section className="grid gap-3" aria-labelledby={`${id}-title`}>
      <h2 id={`${id}-title`} className="text-xl font-bold text-peat-900">Course log</h2>
      {entries.length === 0 ? (
        <p className="text-peat-700">Nothing logged yet. Log each dose when you give it; you will get an e-mail when the next one is due.</p>
      ) : (
        <ol className="grid gap-1" data-testid="course-entries">
          {entries.map((e) => (
            <li key={e.id}>
              <time dateTime={e.at} className="font-bold">{new Date(e.at).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}</time>{" "}
              — {e.kind === "dose" ? `dose of ${e.amountMl} mL` : e.text}
              {e.photoId ? (
                <a href={`/api/photos/${e.photoId}?size=full`} className="ml-2 inline-block align-middle">
                  <img src={`/api/photos/${e.photoId}?size=thumb`} alt="Photo with this observation" className="inline h-12 rounded border border-peat-100" />
                </a>
              ) : null}
            </li>
          ))}
        </ol>
      )}
      {open ? (
        <form onSubmit={onSubmit} className="grid max-w-xl gap-3 rounded-lg border border-peat-100 bg-white p-4" aria-label="Add to the course log">
          <fieldset className="flex gap-4">
            <legend className="sr-only">What to log</legend>
            <label className="flex items-center gap-2"><input type="radio" name="kind" checked={kind === "dose"} onChange={() => setKind("dose")} /> A dose</label>
            <label className="flex items-center gap-2"><input type="radio" name="kind" checked={kind === "observation"} onChange={() => setKind("observation")} /> An observation</label>
          </fieldset>
          <label htmlFor={`${id}-at`} className="font-bold">When</label>
          <input id={`${id}-at`} type="datetime-local" value={at} onChange={(e) => setAt(e.target.value)} className="rounded-md border border-peat-300 px-3 py-2" />
          {kind === "dose" ? (
            <>
              <label htmlFor={`${id}-ml`} className="font-bold">mL of stock added</label>
              <input id={`${id}-ml`} inputMode="decimal" value={amount} onChange={(e) => setAmount(e.target.value)} className="rounded-md border border-peat-300 px-3 py-2" />
            </>
          ) : (
            <>
              <label htmlFor={`${id}-text`} className="font-bold">What you saw</label>
              <textarea id={`${id}-text`} rows={3} value={text} onChange={(e) => setText(e.target.value)} className="rounded-md border border-peat-300 px-3 py-2" />
              <label htmlFor={`${id}-photo`} className="font-bold">Photo (optional)</label>
              <input id={`${id}-photo`} type="file" accept="image/jpeg,image/png,image/webp,image/avif" onChange={(e) => setPhoto(e.target.files?.[0] ?? null)} />
            </>
          )}
          {error ? <p role="alert" className="font-bold text-alarm-700">{error}</p> : null}
          <button type="submit" disabled={busy} className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white">{busy ? "Saving…" : "Add to the log"}</button>
        </form>
      ) : null}
    </section>
  );
}
