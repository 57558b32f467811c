"use client";

import { useRouter } from "next/navigation";
import { useEffect, useId, useMemo, useRef, useState, type ReactNode } from "react";
import { doseWarnings, planDose, readStrength, volumeUnitLabels, volumeUnits } from "@/features/dosing";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { conditionOutcomes, distressLevels, lossCauses, reportDraftSchema, settings, sizeClasses } from "../schemas";

export interface WizardCatalogue {
  species: { id: string; scientificName: string; commonName: string; groupSlug: string }[];
  conditions: { slug: string; name: string }[];
  agents: {
    slug: string; name: string; unit: "mg/L" | "g/L"; redoseHours: number | null; plausibleCeiling?: number;
    stockForms: { id: string; label: string; percent: number; basis: "w/v" | "w/w"; densityGPerMl: number | null; activeFraction: number; compound?: string | null }[];
  }[];
}

export interface WizardReport {
  id: string;
  status: string;
  speciesId: string | null;
  speciesOther: string | null;
  fishCount: number | null;
  sizeClass: string | null;
  conditionSlug: string | null;
  startedOn: string | null;
  water: { volume: number | null; volumeUnit: string | null; temperature: number | null; temperatureUnit: string | null; ph: number | null; setting: string | null };
  treatment: { agentSlug: string | null; stockFormId?: string | null; stockPercent: number | null; stockBasis: string | null; stockDensityGPerMl: number | null; amountMl: number | null; statedConcentration: number | null; doses: number | null; intervalHours: number | null; otherTreatments: string | null };
  outcome: { fishLost: number | null; lossCause: string | null; distress: string | null; condition: string | null; observedDaysAfter: number | null; notes: string | null };
  showName: boolean;
  courseOpen: boolean;
  photos: { id: string; width: number; height: number; stage: string }[];
  lastNote: { action: string; note: string | null } | null;
}

const steps = ["Fish", "Water", "Treatment", "Outcome", "Photos and submit"] as const;
// Set when the reader moves to another step; the step's heading then takes focus, so keyboard and screen-reader users
// start at the top of the new step. Module-level, and a deadline rather than a flag, because saving a step renders the
// new step and then remounts the wizard once the refreshed draft arrives (its key changes): both should focus.
let focusStepHeadingUntil = 0;
const s = (v: number | string | null | undefined) => (v == null ? "" : String(v));
const labels: Record<string, string> = {
  juvenile: "Juvenile", subadult: "Sub-adult", adult: "Adult", bare: "Bare hospital tank", planted: "Planted or furnished tank", other: "Other",
  treatment: "The treatment", disease: "The disease", unknown: "Not sure", none: "None seen", mild: "Mild (hiding, clamped fins, fast breathing)",
  severe: "Severe (gasping, lying on the bottom, loss of balance)", cleared: "Cleared", improved: "Improved", unchanged: "Unchanged", worse: "Worse",
};

type Form = Record<string, string> & { [k: string]: string };

export type WizardPrefill = Partial<Record<"agentSlug" | "stockFormId" | "stockPercent" | "stockBasis" | "volume" | "volumeUnit" | "amountMl" | "intervalHours", string>>;

function initialForm(r: WizardReport | null, defaults: WizardPrefill): Form {
  const form: Form = {
    speciesId: r ? (r.speciesId ?? (r.speciesOther ? "__other" : "")) : "",
    speciesOther: s(r?.speciesOther), fishCount: s(r?.fishCount), sizeClass: s(r?.sizeClass), conditionSlug: s(r?.conditionSlug), startedOn: s(r?.startedOn),
    volume: s(r?.water.volume), volumeUnit: r?.water.volumeUnit ?? "L", temperature: s(r?.water.temperature), temperatureUnit: r?.water.temperatureUnit ?? "C", ph: s(r?.water.ph), setting: s(r?.water.setting),
    agentSlug: r?.treatment.agentSlug ?? defaults.agentSlug ?? "hydrogen-peroxide", stockFormId: s(r?.treatment.stockFormId), stockPercent: s(r?.treatment.stockPercent), stockBasis: r?.treatment.stockBasis ?? "w/v", stockDensityGPerMl: s(r?.treatment.stockDensityGPerMl),
    amountMl: s(r?.treatment.amountMl), statedConcentration: s(r?.treatment.statedConcentration), doses: s(r?.treatment.doses ?? 1), intervalHours: s(r?.treatment.intervalHours), otherTreatments: s(r?.treatment.otherTreatments),
    fishLost: s(r?.outcome.fishLost ?? (r ? null : 0)), lossCause: s(r?.outcome.lossCause), distress: s(r?.outcome.distress), condition: s(r?.outcome.condition), observedDaysAfter: s(r?.outcome.observedDaysAfter), notes: s(r?.outcome.notes),
    showName: r?.showName ? "yes" : "no",
  };
  // A course started from the planner arrives with its treatment and water filled in.
  if (!r) for (const [k, v] of Object.entries(defaults)) if (v) form[k] = v;
  return form;
}

const num = (v: string | undefined) => v === undefined ? undefined :  (v.trim() === "" ? undefined : Number(v.replace(",", ".")));
const str = (v: string | undefined) => v === undefined ? undefined :  (v.trim() === "" ? undefined : v.trim());

/** The part of the report that one step edits, as the API's nested body. */
function stepPatch(step: number, f: Form): Record<string, unknown> {
  if (step === 0) {
    return {
      speciesId: f.speciesId === "__other" ? null : str(f.speciesId),
      speciesOther: f.speciesId === "__other" ? (str(f.speciesOther) ?? "") : undefined,
      fishCount: num(f.fishCount), sizeClass: str(f.sizeClass), conditionSlug: str(f.conditionSlug), startedOn: str(f.startedOn),
    };
  }
  if (step === 1) return { water: { volume: num(f.volume), volumeUnit: f.volumeUnit, temperature: num(f.temperature), temperatureUnit: f.temperatureUnit, ph: num(f.ph), setting: str(f.setting) } };
  if (step === 2) {
    return {
      treatment: {
        agentSlug: str(f.agentSlug), stockFormId: str(f.stockFormId) ?? null, stockPercent: num(f.stockPercent), stockBasis: f.stockBasis, stockDensityGPerMl: num(f.stockDensityGPerMl),
        amountMl: num(f.amountMl), statedConcentration: num(f.statedConcentration), doses: num(f.doses), intervalHours: num(f.intervalHours), otherTreatments: str(f.otherTreatments),
      },
    };
  }
  if (step === 3) {
    const lost = num(f.fishLost);
    return {
      outcome: { fishLost: lost, lossCause: lost ? (str(f.lossCause) ?? null) : null, distress: str(f.distress), condition: str(f.condition), observedDaysAfter: num(f.observedDaysAfter), notes: str(f.notes) },
      showName: f.showName === "yes",
    };
  }
  return {};
}

const required: Record<number, [string, string][]> = {
  0: [["speciesId", "Choose the species, or “not listed”."], ["fishCount", "Give the number of fish treated."], ["sizeClass", "Choose the size."], ["conditionSlug", "Choose the condition treated."], ["startedOn", "Give the date the course started."]],
  1: [["volume", "Give the water volume."], ["temperature", "Give the water temperature."], ["setting", "Choose the kind of tank."]],
  2: [["agentSlug", "Choose the treatment."], ["doses", "Give the number of doses."]],
  3: [["fishLost", "Give the number of fish lost (0 if none)."], ["distress", "Choose the distress seen."], ["condition", "Choose how the condition ended."], ["observedDaysAfter", "Give the days watched after the last dose."]],
};

/** The wizard step each field is on, for the submit checklist (the fields named in steps' <Fld>s). */
const stepOfField: Record<string, number> = Object.fromEntries(
  [
    ["speciesId", "speciesOther", "fishCount", "sizeClass", "conditionSlug", "startedOn"],
    ["volume", "volumeUnit", "temperature", "temperatureUnit", "ph", "setting"],
    ["agentSlug", "stockFormId", "stockPercent", "stockBasis", "stockDensityGPerMl", "amountMl", "statedConcentration", "doses", "intervalHours", "otherTreatments"],
    ["fishLost", "lossCause", "distress", "condition", "observedDaysAfter", "notes"],
  ].flatMap((fields, step) => fields.map((f) => [f, step])),
);
const plainFix: Record<string, string> = {
  ...Object.fromEntries(Object.values(required).flat()),
  speciesOther: "Give the species as you know it.", ph: "Give a pH between 0 and 14, or leave it empty.", stockPercent: "Give the stock strength (%) of what you added.",
  amountMl: "Give the mL added per dose.", intervalHours: "Give the hours between doses.", lossCause: "Choose the likely cause of the losses.", stockBasis: "Choose what the strength is of.",
};
// A server message that names a field or lists allowed values is not for people: say the field's own fix instead.
const looksRaw = (m: string) => /\b[a-z]+[A-Z]\w*\b|\b[a-z]+_[a-z_]+\b|must be one of|\bmust be [\w/-]+(, [\w/-]+)* or [\w/-]+|^[a-z]\w* (must|is) /.test(m);
interface ChecklistItem { field: string; step: number; text: string }
function checklistOf(issues: { path: string; message: string }[]): ChecklistItem[] {
  const seen = new Set<string>();
  const items: ChecklistItem[] = [];
  for (const i of issues) {
    const field = fieldOfPath(i.path);
    if (seen.has(field)) continue;
    seen.add(field);
    const step = stepOfField[field] ?? 4;
    items.push({ field, step, text: !looksRaw(i.message) ? i.message : (plainFix[field] ?? "Check this answer.") });
  }
  return items.sort((x, y) => x.step - y.step);
}

const fieldOfPath = (path: string) => path.split(".").pop()!.replace(/^condition$/, "condition");

function Fld({ fid, errs, name, label, hint, children }: { fid: string; errs: Record<string, string>; name: string; label: string; hint?: string; children: ReactNode }) {
  return (
    <div className="grid gap-1">
      <label htmlFor={`${fid}-${name}`} className="font-bold">{label}</label>
      {hint ? <p id={`${fid}-${name}-hint`} className="text-sm text-peat-700">{hint}</p> : null}
      {children}
      {errs[name] ? <p id={`${fid}-${name}-error`} className="text-sm font-bold text-alarm-700">{errs[name]}</p> : null}
    </div>
  );
}

export function ReportWizard({ catalogue, report, step: initialStep, course, photos, prefill }: { catalogue: WizardCatalogue; report: WizardReport | null; step: number; course?: boolean; photos?: ReactNode; prefill?: WizardPrefill }) {
  const router = useRouter();
  const id = useId();
  const [step, setStep] = useState(Math.min(Math.max(initialStep, 0), steps.length - 1));
  const [form, setForm] = useState<Form>(() => initialForm(report, prefill ?? {}));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [banner, setBanner] = useState<string | null>(null);
  const [checklist, setChecklist] = useState<ChecklistItem[] | null>(null);
  const [busy, setBusy] = useState(false);
  const [speciesSearch, setSpeciesSearch] = useState("");
  const set = (k: string) => (e: { target: { value: string } }) => setForm((f) => ({ ...f, [k]: e.target.value }));
  const stepHeading = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    if (Date.now() < focusStepHeadingUntil) stepHeading.current?.focus();
  }, [step]);
  const goTo = (n: number) => {
    focusStepHeadingUntil = Date.now() + 3000;
    setStep(n);
  };

  const agent = catalogue.agents.find((a) => a.slug === form.agentSlug);
  const preview = useMemo(() => {
    try {
      if (!agent || !num(form.amountMl) || !num(form.stockPercent) || !num(form.volume)) return null;
      // The same reading as the server's: a stock form counts only when named, never matched by its percentage.
      const preset = agent.stockForms.find((p) => p.id === form.stockFormId);
      const reading = readStrength({ percent: num(form.stockPercent), basis: form.stockBasis as "w/v" | "w/w", densityGPerMl: num(form.stockDensityGPerMl), preset: preset ? { ...preset, compound: preset.compound ?? null } : null });
      return planDose({
        agentSlug: agent.slug, unit: agent.unit,
        stock: { percent: reading.percent, basis: reading.basis, densityGPerMl: reading.densityGPerMl, activeFraction: reading.activeFraction },
        water: { kind: "volume", volume: num(form.volume)!, unit: form.volumeUnit as (typeof volumeUnits)[number] },
        addedMl: num(form.amountMl),
      });
    } catch {
      return null;
    }
  }, [agent, form.stockFormId, form.amountMl, form.stockPercent, form.stockBasis, form.stockDensityGPerMl, form.volume, form.volumeUnit]);
  const previewWarnings = preview && agent ? doseWarnings({ unit: agent.unit, ceiling: agent.plausibleCeiling ?? null, doses: [{ label: "that dose", concentration: preview.concentration }] }) : [];

  const matches = useMemo(() => {
    const q = speciesSearch.trim().toLowerCase();
    const list = q ? catalogue.species.filter((x) => `${x.commonName} ${x.scientificName}`.toLowerCase().includes(q)) : catalogue.species;
    return list.slice(0, 200);
  }, [speciesSearch, catalogue.species]);

  async function save(next: number) {
    setBanner(null);
    const errs: Record<string, string> = {};
    for (const [k, msg] of required[step] ?? []) if (!form[k]?.trim()) errs[k] = msg;
    if (step === 0 && form.speciesId === "__other" && !form.speciesOther?.trim()) errs.speciesOther = "Name the species when it is not in the catalogue.";
    if (step === 2) {
      // A step is complete here even though a draft may be partial: the same sentences as the schema's rules.
      if (!form.amountMl?.trim() && !form.statedConcentration?.trim()) errs.amountMl = "Give the mL added per dose, or failing that the concentration you aimed for.";
      if (form.amountMl?.trim() && !form.stockPercent?.trim()) errs.stockPercent = "Give the stock strength (%) of what you added.";
      if ((num(form.doses) ?? 1) > 1 && !form.intervalHours?.trim()) errs.intervalHours = "Give the hours between doses when there was more than one.";
    }
    const patch = stepPatch(step, form);
    const parsed = reportDraftSchema.safeParse(JSON.parse(JSON.stringify(patch)));
    if (!parsed.success) for (const i of parsed.error.issues) errs[fieldOfPath(i.path.map(String).join("."))] ??= i.message;
    if (Object.keys(errs).length) {
      setErrors(errs);
      setBanner("Some answers need fixing before you go on; each one says what to change.");
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      let reportId = report?.id;
      if (!reportId) {
        const carried = prefill && Object.values(prefill).some(Boolean) ? JSON.parse(JSON.stringify({ ...stepPatch(1, form), ...stepPatch(2, form) })) : {};
        const created = await fetchJson<{ id: string }>("/api/reports/drafts", { method: "POST", body: JSON.stringify({ ...carried, ...patch, ...(course ? { courseOpen: true } : {}) }) });
        reportId = created.id;
      } else if (step < 4) {
        await fetchJson(`/api/reports/${reportId}`, { method: "PATCH", body: JSON.stringify(patch) });
      }
      focusStepHeadingUntil = Date.now() + 10_000;
      router.replace(`/reports/${reportId}/edit?step=${next}`);
      router.refresh();
      setStep(next);
    } catch (err) {
      if (err instanceof ApiError && err.body.issues) {
        setErrors(Object.fromEntries(err.body.issues.map((i) => [fieldOfPath(i.path), i.message])));
      }
      setBanner(err instanceof ApiError ? err.message : "The draft could not be saved; check your connection and try again.");
    } finally {
      setBusy(false);
    }
  }

  async function submit() {
    if (!report) return;
    setBusy(true);
    setBanner(null);
    setChecklist(null);
    try {
      await fetchJson(`/api/reports/${report.id}/submit`, { method: "POST" });
      router.push(`/reports/${report.id}?submitted=1`);
      router.refresh();
    } catch (err) {
      if (err instanceof ApiError && err.body.issues?.length) {
        setChecklist(checklistOf(err.body.issues));
      } else setBanner(err instanceof ApiError ? err.message : "The report could not be submitted; try again.");
    } finally {
      setBusy(false);
    }
  }

  const input = "w-full rounded-md border border-peat-300 bg-white px-3 py-2 aria-[invalid=true]:border-alarm-500";
  const a = (name: string) => ({ id: `${id}-${name}`, name, value: form[name] ?? "", onChange: set(name), className: input, "aria-invalid": errors[name] ? true : undefined, "aria-describedby": errors[name] ? `${id}-${name}-error` : undefined });

  return (
    <div className="grid gap-6">
      <ol className="flex flex-wrap gap-2" aria-label="Steps">
        {steps.map((label, i) => (
          <li key={label}>
            <button
              type="button"
              disabled={!report && i > 0}
              aria-current={i === step ? "step" : undefined}
              onClick={() => report && goTo(i)}
              className={`rounded-full border px-3 py-1 text-sm ${i === step ? "border-peat-700 bg-peat-700 text-white" : "border-peat-300 bg-white"} disabled:opacity-50`}
            >
              {i + 1}. {label}
            </button>
          </li>
        ))}
      </ol>
      {report?.status === "returned" && report.lastNote?.note ? (
        <div role="note" className="rounded-md border-l-4 border-reed-500 bg-reed-100 p-4">
          <p className="font-bold">Returned by a moderator with this note:</p>
          <p>{report.lastNote.note}</p>
        </div>
      ) : null}
      {banner ? <p role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">{banner}</p> : null}
      {checklist ? (
        <div role="alert" className="grid gap-2 rounded-md border-l-4 border-alarm-500 bg-alarm-100 p-4" data-testid="submit-checklist">
          <p className="font-bold text-alarm-700">The report is not submitted yet: {checklist.length === 1 ? "one thing is" : `${checklist.length} things are`} missing or need fixing.</p>
          <ul className="grid gap-1">
            {checklist.map((c) => (
              <li key={c.field}>
                <button
                  type="button"
                  className="text-left underline"
                  onClick={() => {
                    setStep(c.step);
                    // After the step renders, put the cursor in the field to fix.
                    setTimeout(() => document.getElementById(`${id}-${c.field}`)?.focus(), 0);
                  }}
                >
                  Step {c.step + 1}, {steps[c.step]}
                </button>
                : {c.text}
              </li>
            ))}
          </ul>
        </div>
      ) : null}

      <h2 ref={stepHeading} tabIndex={-1} className="text-xl font-bold text-peat-900" data-testid="step-heading">
        Step {step + 1} of {steps.length}: {steps[step]}
      </h2>
      <form className="grid max-w-2xl gap-4" onSubmit={(e) => { e.preventDefault(); if (step < 4) void save(step + 1); }} noValidate aria-label={steps[step]}>
        {step === 0 ? (
          <>
            <Fld fid={id} errs={errors} name="speciesId" label="Species" hint="Type to narrow the list; choose “not listed” if yours is missing.">
              <input type="search" aria-label="Search species" placeholder="Search by common or scientific name" className={input} value={speciesSearch} onChange={(e) => setSpeciesSearch(e.target.value)} />
              <select {...a("speciesId")} size={6}>
                <option value="__other">Not listed — I will name it</option>
                {matches.map((x) => (
                  <option key={x.id} value={x.id}>{x.commonName} ({x.scientificName})</option>
                ))}
              </select>
            </Fld>
            {form.speciesId === "__other" ? (
              <Fld fid={id} errs={errors} name="speciesOther" label="Species, as you know it" hint="A moderator will match it to the catalogue.">
                <input {...a("speciesOther")} />
              </Fld>
            ) : null}
            <div className="grid grid-cols-2 gap-4">
              <Fld fid={id} errs={errors} name="fishCount" label="Fish treated"><input {...a("fishCount")} inputMode="numeric" /></Fld>
              <Fld fid={id} errs={errors} name="sizeClass" label="Size">
                <select {...a("sizeClass")}><option value="">Choose…</option>{sizeClasses.map((x) => <option key={x} value={x}>{labels[x]}</option>)}</select>
              </Fld>
            </div>
            <Fld fid={id} errs={errors} name="conditionSlug" label="Condition treated">
              <select {...a("conditionSlug")}><option value="">Choose…</option>{catalogue.conditions.map((c) => <option key={c.slug} value={c.slug}>{c.name}</option>)}</select>
            </Fld>
            <Fld fid={id} errs={errors} name="startedOn" label="Course started on"><input {...a("startedOn")} type="date" max={new Date().toISOString().slice(0, 10)} /></Fld>
          </>
        ) : null}

        {step === 1 ? (
          <>
            <div className="grid grid-cols-2 gap-4">
              <Fld fid={id} errs={errors} name="volume" label="Water volume treated"><input {...a("volume")} inputMode="decimal" /></Fld>
              <Fld fid={id} errs={errors} name="volumeUnit" label="Volume unit"><select {...a("volumeUnit")}>{volumeUnits.map((u) => <option key={u} value={u}>{volumeUnitLabels[u]}</option>)}</select></Fld>
              <Fld fid={id} errs={errors} name="temperature" label="Water temperature"><input {...a("temperature")} inputMode="decimal" /></Fld>
              <Fld fid={id} errs={errors} name="temperatureUnit" label="Temperature unit"><select {...a("temperatureUnit")}><option value="C">°C</option><option value="F">°F</option></select></Fld>
            </div>
            <Fld fid={id} errs={errors} name="ph" label="pH (optional)"><input {...a("ph")} inputMode="decimal" /></Fld>
            <Fld fid={id} errs={errors} name="setting" label="Kind of tank">
              <select {...a("setting")}><option value="">Choose…</option>{settings.map((x) => <option key={x} value={x}>{labels[x]}</option>)}</select>
            </Fld>
          </>
        ) : null}

        {step === 2 ? (
          <>
            <Fld fid={id} errs={errors} name="agentSlug" label="Treatment">
              <select {...a("agentSlug")}>{catalogue.agents.map((x) => <option key={x.slug} value={x.slug}>{x.name}</option>)}</select>
            </Fld>
            <Fld fid={id} errs={errors} name="stockFormId" label="Stock bottle" hint="A listed bottle says what its percentage is of (for example a compound, of which only part is the active); a typed strength counts the active itself.">
              <select
                {...a("stockFormId")}
                onChange={(e) => {
                  const p = agent?.stockForms.find((x) => x.id === e.target.value);
                  setForm((f) => ({ ...f, stockFormId: e.target.value, ...(p ? { stockPercent: String(p.percent), stockBasis: p.basis, stockDensityGPerMl: "" } : {}) }));
                }}
              >
                <option value="">Another strength (type it below)</option>
                {agent?.stockForms.map((p) => <option key={p.id} value={p.id}>{p.label}</option>)}
              </select>
            </Fld>
            <Fld fid={id} errs={errors} name="stockPercent" label="Stock strength (%)" hint={agent ? `Common strengths: ${agent.stockForms.map((p) => `${p.percent} % ${p.basis}`).join(", ")}.` : undefined}>
              <input {...a("stockPercent")} inputMode="decimal" />
            </Fld>
            <div className="grid grid-cols-2 gap-4">
              <Fld fid={id} errs={errors} name="stockBasis" label="Strength basis"><select {...a("stockBasis")}><option value="w/v">w/v (g per 100 mL)</option><option value="w/w">w/w (g per 100 g)</option></select></Fld>
              <Fld fid={id} errs={errors} name="stockDensityGPerMl" label="Density, g/mL (w/w only, if not a listed strength)"><input {...a("stockDensityGPerMl")} inputMode="decimal" /></Fld>
              <Fld fid={id} errs={errors} name="amountMl" label="mL added per dose (largest dose)"><input {...a("amountMl")} inputMode="decimal" /></Fld>
              <Fld fid={id} errs={errors} name="statedConcentration" label={`Concentration you aimed for (${agent?.unit ?? "mg/L"}), optional`}><input {...a("statedConcentration")} inputMode="decimal" /></Fld>
              <Fld fid={id} errs={errors} name="doses" label="Number of doses"><input {...a("doses")} inputMode="numeric" /></Fld>
              <Fld fid={id} errs={errors} name="intervalHours" label="Hours between doses"><input {...a("intervalHours")} inputMode="decimal" /></Fld>
            </div>
            {preview ? (
              <p className="rounded-md bg-peat-50 p-3" data-testid="computed-dose">That dose makes <strong>{preview.concentration.toFixed(preview.concentration >= 10 ? 1 : 2)} {agent?.unit}</strong> in your water (computed from amount, strength and volume).</p>
            ) : null}
            {previewWarnings.map((w) => (
              <p key={w.code} role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">{w.message} If the figures are right, say so in the notes.</p>
            ))}
            <Fld fid={id} errs={errors} name="otherTreatments" label="Other treatments at the same time (optional)"><input {...a("otherTreatments")} /></Fld>
          </>
        ) : null}

        {step === 3 ? (
          <>
            <div className="grid grid-cols-2 gap-4">
              <Fld fid={id} errs={errors} name="fishLost" label="Fish lost"><input {...a("fishLost")} inputMode="numeric" /></Fld>
              {num(form.fishLost) ? (
                <Fld fid={id} errs={errors} name="lossCause" label="Likely cause of the losses">
                  <select {...a("lossCause")}><option value="">Choose…</option>{lossCauses.map((x) => <option key={x} value={x}>{labels[x]}</option>)}</select>
                </Fld>
              ) : <div />}
            </div>
            <Fld fid={id} errs={errors} name="distress" label="Distress seen after dosing">
              <select {...a("distress")}><option value="">Choose…</option>{distressLevels.map((x) => <option key={x} value={x}>{labels[x]}</option>)}</select>
            </Fld>
            <Fld fid={id} errs={errors} name="condition" label="How the condition ended">
              <select {...a("condition")}><option value="">Choose…</option>{conditionOutcomes.map((x) => <option key={x} value={x}>{labels[x]}</option>)}</select>
            </Fld>
            <Fld fid={id} errs={errors} name="observedDaysAfter" label="Days watched after the last dose"><input {...a("observedDaysAfter")} inputMode="numeric" /></Fld>
            <Fld fid={id} errs={errors} name="notes" label="Notes (optional)"><textarea {...a("notes")} rows={4} /></Fld>
            <fieldset className="grid gap-1">
              <legend className="font-bold">Show my display name on this report?</legend>
              <label className="flex items-center gap-2"><input type="radio" name="showName" checked={form.showName === "yes"} onChange={() => setForm((f) => ({ ...f, showName: "yes" }))} /> Yes, show my name</label>
              <label className="flex items-center gap-2"><input type="radio" name="showName" checked={form.showName !== "yes"} onChange={() => setForm((f) => ({ ...f, showName: "no" }))} /> No, keep it to the moderators</label>
            </fieldset>
          </>
        ) : null}

        {step === 4 && report ? (
          <>
            {photos}
            <div className="flex gap-3">
              <button type="button" onClick={() => void submit()} disabled={busy} className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:bg-peat-300">
                {busy ? "Submitting…" : "Submit for review"}
              </button>
              <button type="button" onClick={() => router.push(`/reports/${report.id}`)} className="rounded-md border border-peat-300 px-4 py-2">Keep as draft</button>
            </div>
          </>
        ) : null}

        {step < 4 ? (
          <div className="flex gap-3">
            {step > 0 ? <button type="button" onClick={() => goTo(step - 1)} className="rounded-md border border-peat-300 px-4 py-2">Back</button> : null}
            <button type="submit" disabled={busy} className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:bg-peat-300">
              {busy ? "Saving…" : "Save and continue"}
            </button>
          </div>
        ) : null}
        <p className="text-sm text-peat-700">Each step is saved as a draft: you can close the page and come back from My reports.</p>
      </form>
    </div>
  );
}
