"use client";

import { useRouter } from "next/navigation";
import { useId, useState, type FormEvent } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { overrideNoteMin } from "../schemas";
import { reportValueLabels } from "@/features/reports/schemas";

const choices = {
  awaiting_review: [
    { value: "accept", label: "Accept — it counts in the evidence" },
    { value: "return", label: "Return to the member for changes" },
    { value: "decline", label: "Decline" },
  ],
  accepted: [{ value: "retract", label: "Retract from the evidence (duplicate, error)" }],
} as const;

/** Where one moderator stands on a report flagged above the agent's ceiling: who proposed to accept it, in this round. */
export interface CeilingState {
  aboveCeiling: boolean;
  proposedByMe: boolean;
  proposedByOther: string | null;
}

export function DecisionForm({
  id,
  status,
  isMine,
  species,
  lossCause,
  ceiling,
  flagsId,
}: {
  id: string;
  status: string;
  isMine: boolean;
  species: { id: string; label: string }[] | null;
  lossCause?: string | null;
  ceiling?: CeilingState;
  flagsId?: string;
}) {
  const router = useRouter();
  const fid = useId();
  const base = choices[status as keyof typeof choices];
  // Above the ceiling, one moderator may instead record an accept that a second moderator completes.
  const needsOverride = status === "awaiting_review" && !!ceiling?.aboveCeiling && !ceiling.proposedByOther;
  const options: readonly { value: string; label: string }[] | undefined =
    base && needsOverride && !ceiling?.proposedByMe
      ? [...base, { value: "propose_accept", label: "Accept, but ask a second moderator to accept too" }]
      : base;
  // Nothing is chosen when the form opens: a decision is always a deliberate act.
  const [decision, setDecision] = useState<string>("");
  const [note, setNote] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [mapTo, setMapTo] = useState("");
  const [mapNote, setMapNote] = useState("");
  const [cause, setCause] = useState(lossCause ?? "");
  const [causeNote, setCauseNote] = useState("");

  if (isMine)
    return (
      <p className="rounded-md bg-reed-100 p-3">This is your own report: another moderator has to decide on it.</p>
    );
  // After a decision the page refreshes with the new status; keep saying what happened.
  if (!options && done)
    return (
      <p role="status" className="font-bold text-peat-700">
        {done}
      </p>
    );
  if (!options)
    return <p className="text-peat-700">No decision applies to a report that is {status.replace("_", " ")}.</p>;

  async function post(path: string, body: unknown, ok: string) {
    setBusy(true);
    setError(null);
    try {
      await fetchJson(path, { method: "POST", body: JSON.stringify(body) });
      setDone(ok);
      router.refresh();
    } catch (err) {
      setError(
        err instanceof ApiError
          ? [err.message, ...(err.body.issues ?? []).map((i) => i.message)].join(" ")
          : "That did not go through; try again.",
      );
    } finally {
      setBusy(false);
    }
  }
  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    if (!decision) {
      setError("Choose a decision first: accept, return or decline.");
      return;
    }
    void post(
      `/api/reports/${id}/decision`,
      { decision, note },
      decision === "propose_accept"
        ? "Your accept is recorded; the report waits for a second moderator to accept it too."
        : "Decision saved; the member has been told by e-mail.",
    );
  };
  const noteLabel =
    decision === "accept" && needsOverride
      ? `Override note (required: at least ${overrideNoteMin} characters saying why this dose is plausible)`
      : decision === "accept" || decision === "propose_accept"
        ? "Note (optional)"
        : decision === "return"
          ? "What should the member fix?"
          : decision === ""
            ? "Note"
            : "Reason";
  return (
    <div className="grid gap-6">
      {species ? (
        <form
          className="grid gap-2 rounded-lg border border-reed-300 bg-reed-100 p-4"
          onSubmit={(e) => {
            e.preventDefault();
            void post(
              `/api/reports/${id}/corrections`,
              { kind: "species", speciesId: mapTo, note: mapNote },
              "Species mapped.",
            );
          }}
        >
          <p className="font-bold">Map the “not listed” species to the catalogue</p>
          <label htmlFor={`${fid}-map`}>Catalogue species</label>
          <select
            id={`${fid}-map`}
            value={mapTo}
            onChange={(e) => setMapTo(e.target.value)}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          >
            <option value="">Choose…</option>
            {species.map((s) => (
              <option key={s.id} value={s.id}>
                {s.label}
              </option>
            ))}
          </select>
          <label htmlFor={`${fid}-mapnote`}>Note</label>
          <input
            id={`${fid}-mapnote`}
            value={mapNote}
            onChange={(e) => setMapNote(e.target.value)}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          />
          <button
            type="submit"
            disabled={busy}
            className="justify-self-start rounded-md border border-peat-500 bg-white px-4 py-2 font-bold"
          >
            Map species
          </button>
        </form>
      ) : null}
      {lossCause ? (
        <form
          className="grid gap-2 rounded-lg border border-peat-100 bg-white p-4"
          aria-label="Correct the likely cause of losses"
          onSubmit={(e) => {
            e.preventDefault();
            void post(
              `/api/reports/${id}/corrections`,
              { kind: "lossCause", lossCause: cause, note: causeNote },
              "Cause corrected.",
            );
          }}
        >
          <p className="font-bold">
            Likely cause of the losses (the member said: {reportValueLabels[lossCause ?? ""] ?? lossCause})
          </p>
          <label htmlFor={`${fid}-cause`}>Corrected cause</label>
          <select
            id={`${fid}-cause`}
            value={cause}
            onChange={(e) => setCause(e.target.value)}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          >
            <option value="treatment">The treatment</option>
            <option value="disease">The disease</option>
            <option value="unknown">Not sure</option>
          </select>
          <label htmlFor={`${fid}-causenote`}>Why</label>
          <input
            id={`${fid}-causenote`}
            value={causeNote}
            onChange={(e) => setCauseNote(e.target.value)}
            className="rounded-md border border-peat-300 bg-white px-3 py-2"
          />
          <button
            type="submit"
            disabled={busy}
            className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold"
          >
            Correct the cause
          </button>
        </form>
      ) : null}
      <form
        onSubmit={onSubmit}
        className="grid gap-3 rounded-lg border border-peat-100 bg-white p-4"
        aria-label="Decision"
      >
        {status === "awaiting_review" && ceiling?.aboveCeiling ? (
          <div
            className="rounded-md border-2 border-alarm-700 bg-white p-3"
            id={`${fid}-ceiling`}
            data-testid="ceiling-rule"
          >
            <p className="font-bold text-alarm-700">This dose is above the agent&apos;s plausible ceiling.</p>
            {ceiling.proposedByOther ? (
              <p>
                {ceiling.proposedByOther} has already accepted it and asked for a second moderator: your accept
                completes it.
              </p>
            ) : ceiling.proposedByMe ? (
              <p>
                You have accepted it and asked for a second moderator; another moderator&apos;s accept completes it. You
                can still accept it alone with an override note.
              </p>
            ) : (
              <p>
                To accept it on your own, write an override note of at least {overrideNoteMin} characters saying why the
                dose is plausible. Or choose &ldquo;ask a second moderator&rdquo;: the report is accepted when another
                moderator accepts it too.
              </p>
            )}
          </div>
        ) : null}
        <fieldset
          className="grid gap-2"
          aria-describedby={
            [flagsId, status === "awaiting_review" && ceiling?.aboveCeiling ? `${fid}-ceiling` : null]
              .filter(Boolean)
              .join(" ") || undefined
          }
        >
          <legend className="mb-1 font-bold">Decision</legend>
          {options.map((o) => (
            <label key={o.value} className="flex items-center gap-2">
              <input
                type="radio"
                name="decision"
                value={o.value}
                checked={decision === o.value}
                onChange={() => setDecision(o.value)}
              />{" "}
              {o.label}
            </label>
          ))}
        </fieldset>
        <label htmlFor={`${fid}-note`} className="font-bold">
          {noteLabel}
        </label>
        <textarea
          id={`${fid}-note`}
          rows={3}
          value={note}
          onChange={(e) => setNote(e.target.value)}
          className="rounded-md border border-peat-300 px-3 py-2"
        />
        {decision === "accept" && needsOverride ? (
          <p className="text-sm text-peat-700" aria-live="polite">
            {note.trim().length} of at least {overrideNoteMin} characters.
          </p>
        ) : null}
        {error ? (
          <p role="alert" className="font-bold text-alarm-700">
            {error}
          </p>
        ) : null}
        {done ? (
          <p role="status" className="font-bold text-peat-700">
            {done}
          </p>
        ) : null}
        <button
          type="submit"
          disabled={busy}
          className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white"
        >
          {busy ? "Saving…" : "Record the decision"}
        </button>
      </form>
    </div>
  );
}
