"use client";

import { useRouter } from "next/navigation";
import { useId, useState, type FormEvent } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";

const choices = {
  awaiting_review: [
    { value: "accept", label: "Accept — it counts in the evidence" },
    { value: "return", label: "Return to the member for changes" },
    { value: "decline", label: "Decline" },
  ],
  accepted: [{ value: "retract", label: "Retract from the evidence (duplicate, error)" }],
} as const;

export function DecisionForm({ id, status, isMine, species, lossCause }: { id: string; status: string; isMine: boolean; species: { id: string; label: string }[] | null; lossCause?: string | null }) {
  const router = useRouter();
  const fid = useId();
  const options = choices[status as keyof typeof choices];
  const [decision, setDecision] = useState<string>(options?.[0]?.value ?? "");
  const [note, setNote] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [mapTo, setMapTo] = useState("");
  const [mapNote, setMapNote] = useState("");
  const [cause, setCause] = useState(lossCause ?? "");
  const [causeNote, setCauseNote] = useState("");

  if (isMine) return <p className="rounded-md bg-reed-100 p-3">This is your own report: another moderator has to decide on it.</p>;
  // After a decision the page refreshes with the new status; keep saying what happened.
  if (!options && done) return <p role="status" className="font-bold text-peat-700">{done}</p>;
  if (!options) return <p className="text-peat-700">No decision applies to a report that is {status.replace("_", " ")}.</p>;

  async function post(path: string, body: unknown, ok: string) {
    setBusy(true);
    setError(null);
    try {
      await fetchJson(path, { method: "POST", body: JSON.stringify(body) });
      setDone(ok);
      router.refresh();
    } catch (err) {
      setError(err instanceof ApiError ? [err.message, ...(err.body.issues ?? []).map((i) => i.message)].join(" ") : "That did not go through; try again.");
    } finally {
      setBusy(false);
    }
  }
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void post(`/api/reports/${id}/decision`, { decision, note }, "Decision saved; the member has been told by e-mail.");
  };
  return (
    <div className="grid gap-6">
      {species ? (
        <form className="grid gap-2 rounded-lg border border-reed-300 bg-reed-100 p-4" onSubmit={(e) => { e.preventDefault(); void post(`/api/reports/${id}/corrections`, { kind: "species", speciesId: mapTo, note: mapNote }, "Species mapped."); }}>
          <p className="font-bold">Map the “not listed” species to the catalogue</p>
          <label htmlFor={`${fid}-map`}>Catalogue species</label>
          <select id={`${fid}-map`} value={mapTo} onChange={(e) => setMapTo(e.target.value)} className="rounded-md border border-peat-300 bg-white px-3 py-2">
            <option value="">Choose…</option>
            {species.map((s) => <option key={s.id} value={s.id}>{s.label}</option>)}
          </select>
          <label htmlFor={`${fid}-mapnote`}>Note</label>
          <input id={`${fid}-mapnote`} value={mapNote} onChange={(e) => setMapNote(e.target.value)} className="rounded-md border border-peat-300 bg-white px-3 py-2" />
          <button type="submit" disabled={busy} className="justify-self-start rounded-md border border-peat-500 bg-white px-4 py-2 font-bold">Map species</button>
        </form>
      ) : null}
      {lossCause ? (
        <form className="grid gap-2 rounded-lg border border-peat-100 bg-white p-4" aria-label="Correct the likely cause of losses" onSubmit={(e) => { e.preventDefault(); void post(`/api/reports/${id}/corrections`, { kind: "lossCause", lossCause: cause, note: causeNote }, "Cause corrected."); }}>
          <p className="font-bold">Likely cause of the losses (the member said: {lossCause})</p>
          <label htmlFor={`${fid}-cause`}>Corrected cause</label>
          <select id={`${fid}-cause`} value={cause} onChange={(e) => setCause(e.target.value)} className="rounded-md border border-peat-300 bg-white px-3 py-2">
            <option value="treatment">The treatment</option>
            <option value="disease">The disease</option>
            <option value="unknown">Not sure</option>
          </select>
          <label htmlFor={`${fid}-causenote`}>Why</label>
          <input id={`${fid}-causenote`} value={causeNote} onChange={(e) => setCauseNote(e.target.value)} className="rounded-md border border-peat-300 bg-white px-3 py-2" />
          <button type="submit" disabled={busy} className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold">Correct the cause</button>
        </form>
      ) : null}
      <form onSubmit={onSubmit} className="grid gap-3 rounded-lg border border-peat-100 bg-white p-4" aria-label="Decision">
        <fieldset className="grid gap-2">
          <legend className="mb-1 font-bold">Decision</legend>
          {options.map((o) => (
            <label key={o.value} className="flex items-center gap-2">
              <input type="radio" name="decision" value={o.value} checked={decision === o.value} onChange={() => setDecision(o.value)} /> {o.label}
            </label>
          ))}
        </fieldset>
        <label htmlFor={`${fid}-note`} className="font-bold">{decision === "accept" ? "Note (optional)" : decision === "return" ? "What should the member fix?" : "Reason"}</label>
        <textarea id={`${fid}-note`} rows={3} value={note} onChange={(e) => setNote(e.target.value)} className="rounded-md border border-peat-300 px-3 py-2" />
        {error ? <p role="alert" className="font-bold text-alarm-700">{error}</p> : null}
        {done ? <p role="status" className="font-bold text-peat-700">{done}</p> : null}
        <button type="submit" disabled={busy} className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white">{busy ? "Saving…" : "Record the decision"}</button>
      </form>
    </div>
  );
}
