"use client";

import { useRouter } from "next/navigation";
import { useId, useState, type FormEvent, type InputHTMLAttributes } from "react";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { Field } from "@/features/shared/components/ui";
import { useNow } from "@/features/shared/components/use-now";
import { doseAmountText } from "./dose-amount";

export interface CourseEntryView {
  id: number;
  kind: "dose" | "observation";
  at: string;
  amountMl: number | null;
  /** A dose of dry salt weighed in grams (then amountMl is null). */
  amountGrams?: number | null;
  text: string | null;
  photoId: string | null;
  struckAt?: string | null;
  /** For salt (g/L): the grams of salt the dose holds, weighed dry or poured as brine. */
  activeGrams?: number | null;
  /** The concentration a dose made, in the agent's unit; null where the stock or volume is unknown. */
  concentration?: number | null;
  /** The shared guard rails this dose trips (lowest adverse dose, highest tolerated, plausible ceiling). */
  warnings?: RailWarning[];
}

export interface RailWarning {
  code: string;
  message: string;
}

export interface CourseFiguresView {
  open: boolean;
  unit: string;
  nextDose: {
    at: string;
    doseMl: number | null;
    doseGrams?: number | null;
    concentration: number | null;
    unit: string;
    first: boolean;
  } | null;
  /** Grams of dry salt can be logged (a treatment dosed in g/L). */
  gramsAllowed?: boolean;
  /** Salt with no stock named: the log asks for grams first. */
  weighedDry?: boolean;
  watchFor: string[];
  watchUntil: string | null;
  intervalHours: number | null;
  volumeL?: number | null;
  nextDoseWarnings?: RailWarning[];
}

function localNow(): string {
  return toLocalInput(new Date().toISOString());
}
function toLocalInput(iso: string): string {
  const d = new Date(iso);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60000).toISOString().slice(0, 16);
}
const fmtTime = (iso: string) =>
  new Date(iso).toLocaleString("en-GB", {
    weekday: "short",
    day: "numeric",
    month: "short",
    hour: "2-digit",
    minute: "2-digit",
  });
const round = (n: number, digits = 1) => n.toLocaleString("en-GB", { maximumFractionDigits: digits });

type AmountUnit = "ml" | "grams";
/** The amount field's value as the API's field: amountMl or amountGrams. */
const amountField = (unit: AmountUnit, value: string) => {
  const n = Number(value.replace(",", "."));
  return {
    [unit === "grams" ? "amountGrams" : "amountMl"]: value.trim() === "" ? undefined : Number.isFinite(n) ? n : value,
  };
};

/** Where grams are allowed, the keeper says whether the dose was poured as a solution or weighed as dry salt. */
function AmountUnitChoice({ unit, onChange }: { unit: AmountUnit; onChange: (u: AmountUnit) => void }) {
  const name = useId();
  return (
    <fieldset className="flex flex-wrap gap-4">
      <legend className="font-bold">Measured as</legend>
      <label className="flex items-center gap-2">
        <input type="radio" name={name} checked={unit === "grams"} onChange={() => onChange("grams")} /> grams of dry
        salt
      </label>
      <label className="flex items-center gap-2">
        <input type="radio" name={name} checked={unit === "ml"} onChange={() => onChange("ml")} /> mL of a solution
      </label>
    </fieldset>
  );
}
const amountLabel = (unit: AmountUnit) => (unit === "grams" ? "Grams of dry salt added" : "mL of stock added");
const inputClass = "w-full min-w-0 rounded-md border border-peat-300 px-3 py-2";

/** A setter that also drops a confirmation asked for earlier: the value it was asked about has changed. */
const resetting =
  (reset: () => void) =>
  <T,>(set: (v: T) => void) =>
  (v: T) => {
    set(v);
    reset();
  };

/** A labelled several-line text of the log's forms. */
function TextAreaField({
  id,
  label,
  rows,
  value,
  onValue,
}: {
  id: string;
  label: string;
  rows: number;
  value: string;
  onValue: (v: string) => void;
}) {
  return (
    <Field id={id} label={label}>
      <textarea id={id} rows={rows} value={value} onChange={(e) => onValue(e.target.value)} className={inputClass} />
    </Field>
  );
}

/** A labelled one-line input of the log's forms. */
function InputField({
  id,
  label,
  onValue,
  ...rest
}: { id: string; label: string; value: string; onValue: (v: string) => void } & Omit<
  InputHTMLAttributes<HTMLInputElement>,
  "id" | "onChange"
>) {
  return (
    <Field id={id} label={label}>
      <input id={id} onChange={(e) => onValue(e.target.value)} className={inputClass} {...rest} />
    </Field>
  );
}

/** "in 5 hours", "2 days ago": the words for a time relative to now. */
function inWords(iso: string, now: number): string {
  const diff = Date.parse(iso) - now;
  const rtf = new Intl.RelativeTimeFormat("en-GB", { numeric: "auto" });
  const abs = Math.abs(diff);
  if (abs < 60 * 60_000) return rtf.format(Math.round(diff / 60_000), "minute");
  if (abs < 48 * 3600_000) return rtf.format(Math.round(diff / 3600_000), "hour");
  return rtf.format(Math.round(diff / 86_400_000), "day");
}

/** An API error as one sentence, whether the server asks the keeper to confirm an unusual value, and the guard rails it names. */
function explain(err: unknown): { message: string; needsConfirm: boolean; rails: RailWarning[] } {
  if (!(err instanceof ApiError))
    return { message: "The entry could not be saved; try again.", needsConfirm: false, rails: [] };
  const issues = (err.body.issues ?? []) as { path: string; message: string; code?: string }[];
  // Guard-rail warnings are shown on their own, to be acknowledged; the other reasons stay in the sentence.
  const rails = issues
    .filter((i) => i.code)
    .map((i) => ({
      code: i.code!,
      message: i.message.replace(/ If you have read this and it is right, send confirm: true if it is right\.$/, ""),
    }));
  const rest = issues
    .filter((i) => !i.code)
    .map((i) => i.message.replace(/send confirm: true if it is right\./, "confirm below if it is right."));
  return {
    message: [err.message.replace("see issues", "see below"), ...rest].join(" "),
    needsConfirm: err.status === 422 && issues.length > 0 && issues.every((i) => /confirm: true/.test(i.message)),
    rails,
  };
}

/** The keeper's "yes, it is right": where guard rails are named, only after ticking that they were read. */
function ConfirmBox({ rails, busy, onConfirm }: { rails: RailWarning[]; busy: boolean; onConfirm: () => void }) {
  const [read, setRead] = useState(false);
  return (
    <div className="grid min-w-0 gap-2" data-testid="entry-confirm">
      {rails.length ? (
        <div
          role="alert"
          className="grid min-w-0 gap-2 rounded-lg border-2 border-alarm-500 bg-alarm-100 p-3 text-alarm-700"
          data-testid="entry-rails"
        >
          <p className="font-bold">Stop and read before you log this dose</p>
          <ul className="list-disc space-y-1 pl-5">
            {rails.map((w) => (
              <li key={w.code} data-code={w.code}>
                {w.message}
              </li>
            ))}
          </ul>
          <label className="flex items-start gap-2 font-bold">
            <input type="checkbox" className="mt-1" checked={read} onChange={(e) => setRead(e.target.checked)} />I have
            read these warnings; this is what I gave.
          </label>
        </div>
      ) : null}
      <button
        type="button"
        disabled={busy || (rails.length > 0 && !read)}
        onClick={onConfirm}
        className="justify-self-start rounded-md border-2 border-alarm-700 px-4 py-2 font-bold text-alarm-700 disabled:opacity-50"
      >
        Yes, it is right: save it
      </button>
    </div>
  );
}

export function CourseLog({
  reportId,
  entries,
  open,
  figures,
}: {
  reportId: string;
  entries: CourseEntryView[];
  open: boolean;
  figures?: CourseFiguresView | null;
}) {
  const router = useRouter();
  const id = useId();
  const [kind, setKind] = useState<"dose" | "observation">("dose");
  const [at, setAt] = useState(localNow);
  const [amount, setAmount] = useState("");
  const [unit, setUnit] = useState<AmountUnit>(figures?.gramsAllowed && figures.weighedDry ? "grams" : "ml");
  const [text, setText] = useState("");
  const [photo, setPhoto] = useState<File | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const [rails, setRails] = useState<RailWarning[]>([]);
  const [busy, setBusy] = useState(false);
  const [editing, setEditing] = useState<number | null>(null);
  const edited = resetting(() => {
    setConfirming(false);
    setRails([]);
  });

  async function save(confirm: boolean) {
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
        body: JSON.stringify({
          kind,
          at: new Date(at).toISOString(),
          ...(confirm ? { confirm: true } : {}),
          ...(kind === "dose"
            ? amountField(figures?.gramsAllowed ? unit : "ml", amount)
            : { text: text.trim() || undefined, photoId }),
        }),
      });
      setAmount("");
      setText("");
      setPhoto(null);
      setAt(localNow());
      setConfirming(false);
      setRails([]);
      router.refresh();
    } catch (err) {
      const e = explain(err);
      setError(e.message);
      setConfirming(e.needsConfirm);
      setRails(e.rails);
    } finally {
      setBusy(false);
    }
  }

  function onSubmit(e: FormEvent) {
    e.preventDefault();
    void save(false);
  }

  return (
    <section className="grid min-w-0 gap-3" aria-labelledby={`${id}-title`}>
      <h2 id={`${id}-title`} className="text-xl font-bold text-peat-900">
        Course log
      </h2>
      {figures?.open ? <NextDose figures={figures} /> : null}
      {entries.length === 0 ? (
        <p className="text-peat-700">
          Nothing logged yet. Log each dose when you give it; you will get an e-mail when the next one is due.
        </p>
      ) : (
        <ol className="grid gap-2" data-testid="course-entries">
          {entries.map((e) => (
            <li key={e.id} className="grid min-w-0 gap-1 break-words" data-struck={e.struckAt ? "true" : undefined}>
              <div className={e.struckAt ? "text-peat-700 line-through" : undefined}>
                <time dateTime={e.at} className="font-bold">
                  {new Date(e.at).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}
                </time>{" "}
                —{" "}
                {e.kind === "dose"
                  ? `dose of ${doseAmountText({ doseMl: e.amountMl, doseGrams: e.amountGrams })}`
                  : e.text}
                {e.kind === "dose" && e.concentration != null ? (
                  <span data-testid="entry-concentration">
                    {" "}
                    → {round(e.concentration, 2)} {figures?.unit ?? "mg/L"}
                  </span>
                ) : null}
                {e.kind === "dose" && e.amountGrams == null && e.activeGrams != null ? (
                  <span> ({round(e.activeGrams, 1)} g of salt)</span>
                ) : null}
                {e.kind === "dose" && e.text ? <span> ({e.text})</span> : null}
                {e.photoId ? (
                  <a href={`/api/photos/${e.photoId}?size=full`} className="ml-2 inline-block align-middle">
                    <img
                      src={`/api/photos/${e.photoId}?size=thumb`}
                      alt="Photo with this observation"
                      className="inline h-12 rounded border border-peat-100"
                    />
                  </a>
                ) : null}
              </div>
              {e.warnings?.length ? (
                <ul className="grid gap-1 text-sm font-bold text-alarm-700" data-testid="entry-warning">
                  {e.warnings.map((w) => (
                    <li key={w.code} data-code={w.code}>
                      Warning acknowledged: {w.message}
                    </li>
                  ))}
                </ul>
              ) : null}
              {e.struckAt ? (
                <span className="text-sm text-peat-700">
                  Struck out {new Date(e.struckAt).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}
                  ; kept in the history.
                </span>
              ) : null}
              {open && !e.struckAt ? (
                editing === e.id ? (
                  <EntryEditor
                    reportId={reportId}
                    entry={e}
                    gramsAllowed={Boolean(figures?.gramsAllowed)}
                    onDone={() => {
                      setEditing(null);
                      router.refresh();
                    }}
                    onCancel={() => setEditing(null)}
                  />
                ) : (
                  <button
                    type="button"
                    className="justify-self-start text-sm underline"
                    onClick={() => setEditing(e.id)}
                  >
                    Correct or strike out
                  </button>
                )
              ) : null}
            </li>
          ))}
        </ol>
      )}
      {open ? (
        <form
          onSubmit={onSubmit}
          className="grid w-full max-w-xl min-w-0 gap-3 rounded-lg border border-peat-100 bg-white p-4"
          aria-label="Add to the course log"
        >
          <fieldset className="flex flex-wrap gap-4">
            <legend className="sr-only">What to log</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="kind" checked={kind === "dose"} onChange={() => setKind("dose")} /> A dose
            </label>
            <label className="flex items-center gap-2">
              <input
                type="radio"
                name="kind"
                checked={kind === "observation"}
                onChange={() => setKind("observation")}
              />{" "}
              An observation
            </label>
          </fieldset>
          <InputField id={`${id}-at`} label="When" type="datetime-local" value={at} onValue={edited(setAt)} />
          {kind === "dose" ? (
            <>
              {figures?.gramsAllowed ? <AmountUnitChoice unit={unit} onChange={edited(setUnit)} /> : null}
              <InputField
                id={`${id}-ml`}
                label={amountLabel(figures?.gramsAllowed ? unit : "ml")}
                inputMode="decimal"
                value={amount}
                onValue={edited(setAmount)}
              />
            </>
          ) : (
            <>
              <TextAreaField id={`${id}-text`} label="What you saw" rows={3} value={text} onValue={setText} />
              <Field id={`${id}-photo`} label="Photo (optional)">
                <input
                  id={`${id}-photo`}
                  type="file"
                  accept="image/jpeg,image/png,image/webp,image/avif"
                  onChange={(e) => setPhoto(e.target.files?.[0] ?? null)}
                  className="w-full min-w-0"
                />
              </Field>
            </>
          )}
          {error ? (
            <p role="alert" className="font-bold text-alarm-700">
              {error}
            </p>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <button type="submit" disabled={busy} className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white">
              {busy ? "Saving…" : "Add to the log"}
            </button>
          </div>
          {confirming ? (
            <ConfirmBox
              key={rails.map((r) => r.code).join()}
              rails={rails}
              busy={busy}
              onConfirm={() => void save(true)}
            />
          ) : null}
        </form>
      ) : null}
    </section>
  );
}

function NextDose({ figures }: { figures: CourseFiguresView }) {
  const next = figures.nextDose;
  const now = useNow();
  return (
    <div className="grid min-w-0 gap-2 rounded-lg border-2 border-peat-500 bg-white p-4" data-testid="next-dose">
      {next ? (
        <p>
          <span className="font-bold">
            {next.first
              ? "First dose: due now"
              : now == null
                ? "Next dose"
                : Date.parse(next.at) <= now
                  ? `Next dose: due since ${inWords(next.at, now)}`
                  : `Next dose: ${inWords(next.at, now)}`}
          </span>
          {next.first ? null : (
            <>
              {" "}
              (<time dateTime={next.at}>{fmtTime(next.at)}</time>)
            </>
          )}{" "}
          — <span data-testid="next-dose-ml">{doseAmountText(next)}</span>
          {next.concentration != null ? (
            <>
              , making{" "}
              <span data-testid="next-dose-concentration">
                {round(next.concentration, 2)} {next.unit}
              </span>
            </>
          ) : null}
          {figures.intervalHours ? <> (every {figures.intervalHours} h)</> : null}. Give it only if the fish took the
          last dose well.
        </p>
      ) : (
        <p className="font-bold">
          No further dose is planned
          {figures.watchUntil ? (
            <>
              ; keep watching until <time dateTime={figures.watchUntil}>{fmtTime(figures.watchUntil)}</time>
            </>
          ) : null}
          .
        </p>
      )}
      {figures.nextDoseWarnings?.length ? (
        <ul
          className="grid gap-1 rounded-md bg-alarm-100 p-2 font-bold text-alarm-700"
          data-testid="next-dose-warnings"
        >
          {figures.nextDoseWarnings.map((w) => (
            <li key={w.code} data-code={w.code}>
              {w.message}
            </li>
          ))}
        </ul>
      ) : null}
      <p className="font-bold">What to watch for</p>
      <ul className="ml-5 grid list-disc gap-1">
        {figures.watchFor.map((w) => (
          <li key={w}>{w}</li>
        ))}
      </ul>
    </div>
  );
}

function EntryEditor({
  reportId,
  entry,
  gramsAllowed,
  onDone,
  onCancel,
}: {
  reportId: string;
  entry: CourseEntryView;
  gramsAllowed: boolean;
  onDone: () => void;
  onCancel: () => void;
}) {
  const id = useId();
  const [at, setAt] = useState(() => toLocalInput(entry.at));
  const was: AmountUnit = entry.amountGrams != null ? "grams" : "ml";
  const wasAmount = was === "grams" ? entry.amountGrams : entry.amountMl;
  const [unit, setUnit] = useState<AmountUnit>(was);
  const [amount, setAmount] = useState(wasAmount != null ? String(wasAmount) : "");
  const [text, setText] = useState(entry.text ?? "");
  const [note, setNote] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [confirming, setConfirming] = useState(false);
  const [rails, setRails] = useState<RailWarning[]>([]);
  const [busy, setBusy] = useState(false);
  const edited = resetting(() => {
    setConfirming(false);
    setRails([]);
  });

  async function send(body: Record<string, unknown>) {
    setBusy(true);
    setError(null);
    try {
      await fetchJson(`/api/reports/${reportId}/entries/${entry.id}`, {
        method: "PATCH",
        body: JSON.stringify({ ...body, ...(note.trim() ? { note: note.trim() } : {}) }),
      });
      onDone();
    } catch (err) {
      const e = explain(err);
      setError(e.message);
      setConfirming(e.needsConfirm);
      setRails(e.rails);
    } finally {
      setBusy(false);
    }
  }

  function changes(confirm: boolean): Record<string, unknown> {
    const out: Record<string, unknown> = {};
    if (at !== toLocalInput(entry.at)) out.at = new Date(at).toISOString();
    if (entry.kind === "dose") {
      // Sent when the amount or its unit changed; a dose switched to grams drops its mL, and the other way round.
      const given = amountField(unit, amount);
      const value = Object.values(given)[0];
      if (value !== undefined && (unit !== was || value !== wasAmount)) Object.assign(out, given);
    }
    if (text !== (entry.text ?? "")) out.text = text;
    if (confirm) out.confirm = true;
    return out;
  }

  return (
    <form
      onSubmit={(e) => {
        e.preventDefault();
        void send(changes(false));
      }}
      className="grid w-full max-w-xl min-w-0 gap-2 rounded-lg border border-peat-100 bg-white p-3"
      aria-label="Correct this entry"
    >
      <InputField id={`${id}-at`} label="When" type="datetime-local" value={at} onValue={edited(setAt)} />
      {entry.kind === "dose" ? (
        <>
          {gramsAllowed ? <AmountUnitChoice unit={unit} onChange={edited(setUnit)} /> : null}
          <InputField
            id={`${id}-ml`}
            label={amountLabel(unit)}
            inputMode="decimal"
            value={amount}
            onValue={edited(setAmount)}
          />
        </>
      ) : null}
      <TextAreaField
        id={`${id}-text`}
        label={entry.kind === "dose" ? "Note on the dose" : "What you saw"}
        rows={2}
        value={text}
        onValue={setText}
      />
      <InputField id={`${id}-note`} label="Why (kept in the history)" value={note} onValue={setNote} />
      {error ? (
        <p role="alert" className="font-bold text-alarm-700">
          {error}
        </p>
      ) : null}
      <div className="flex flex-wrap gap-3">
        <button type="submit" disabled={busy} className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white">
          Save the correction
        </button>
        <button
          type="button"
          disabled={busy}
          onClick={() => void send({ struck: true })}
          className="rounded-md border border-alarm-700 px-4 py-2 text-alarm-700"
        >
          Strike out
        </button>
        <button type="button" disabled={busy} onClick={onCancel} className="rounded-md px-4 py-2 underline">
          Cancel
        </button>
      </div>
      {confirming ? (
        <ConfirmBox
          key={rails.map((r) => r.code).join()}
          rails={rails}
          busy={busy}
          onConfirm={() => void send(changes(true))}
        />
      ) : null}
    </form>
  );
}

/** A due time in words and in the reader's local time (formatted in the browser, hence no hydration warning). */
export function DueTime({ at }: { at: string }) {
  const now = useNow();
  return (
    <time dateTime={at} suppressHydrationWarning>
      {now == null ? "" : Date.parse(at) <= now ? `due since ${inWords(at, now)} ` : `${inWords(at, now)} `}(
      {fmtTime(at)})
    </time>
  );
}
