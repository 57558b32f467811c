"use client";

import { useRouter } from "next/navigation";
import { useEffect, useId, useMemo, useRef, useState, type ReactNode } from "react";
import { get, useForm, useWatch, type FieldPath } from "react-hook-form";
import { doseWarnings, planDose, readStrength, volumeUnitLabels, volumeUnits } from "@/features/dosing";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { conditionOutcomes, distressLevels, lossCauses, settings, sizeClasses } from "../schemas";
import {
  readNumber as num,
  SPECIES_NOT_LISTED,
  stepOfPath,
  stepPatch,
  wizardResolver,
  type WizardValues,
} from "./report-wizard-values";

export interface WizardCatalogue {
  species: { id: string; scientificName: string; commonName: string; groupSlug: string }[];
  conditions: { slug: string; name: string }[];
  agents: {
    slug: string;
    name: string;
    unit: "mg/L" | "g/L";
    redoseHours: number | null;
    plausibleCeiling?: number;
    stockForms: {
      id: string;
      label: string;
      percent: number;
      basis: "w/v" | "w/w";
      densityGPerMl: number | null;
      activeFraction: number;
      compound?: string | null;
    }[];
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
  water: {
    volume: number | null;
    volumeUnit: string | null;
    temperature: number | null;
    temperatureUnit: string | null;
    ph: number | null;
    setting: string | null;
  };
  treatment: {
    agentSlug: string | null;
    stockFormId?: string | null;
    stockPercent: number | null;
    stockBasis: string | null;
    stockDensityGPerMl: number | null;
    amountMl: number | null;
    statedConcentration: number | null;
    doses: number | null;
    intervalHours: number | null;
    otherTreatments: string | null;
  };
  outcome: {
    fishLost: number | null;
    lossCause: string | null;
    distress: string | null;
    condition: string | null;
    observedDaysAfter: number | null;
    notes: string | null;
  };
  showName: boolean;
  courseOpen: boolean;
  photos: { id: string; width: number; height: number; stage: string }[];
  lastNote: { action: string; note: string | null } | null;
}

const steps = ["Fish", "Water", "Treatment", "Outcome", "Photos and submit"] as const;
// Set when the reader moves to another step; the step's heading then takes focus, so keyboard and screen-reader users
// start at the top of the new step. Module-level, and a deadline rather than a flag, because saving a step renders the
// new step and then remounts the wizard once the refreshed draft arrives (its key changes): both should focus.
const s = (v: number | string | null | undefined) => (v == null ? "" : String(v));
const labels: Record<string, string> = {
  juvenile: "Juvenile",
  subadult: "Sub-adult",
  adult: "Adult",
  bare: "Bare hospital tank",
  planted: "Planted or furnished tank",
  other: "Other",
  treatment: "The treatment",
  disease: "The disease",
  unknown: "Not sure",
  none: "None seen",
  mild: "Mild (hiding, clamped fins, fast breathing)",
  severe: "Severe (gasping, lying on the bottom, loss of balance)",
  cleared: "Cleared",
  improved: "Improved",
  unchanged: "Unchanged",
  worse: "Worse",
};

export type WizardPrefill = Partial<
  Record<
    | "speciesId"
    | "agentSlug"
    | "stockFormId"
    | "stockPercent"
    | "stockBasis"
    | "volume"
    | "volumeUnit"
    | "amountMl"
    | "statedConcentration"
    | "intervalHours",
    string
  >
>;

const FOCUS_STEP_KEY = "tanklore-focus-step-heading";
/** Called from event handlers when the keeper moves to another step: the next step's heading takes the focus. */
function markStepMove(): void {
  sessionStorage.setItem(FOCUS_STEP_KEY, String(Date.now() + 10_000));
}

function initialValues(r: WizardReport | null, defaults: WizardPrefill): WizardValues {
  // A course started from the planner arrives with its treatment and water filled in.
  const pre = r ? {} : Object.fromEntries(Object.entries(defaults).filter(([, v]) => v));
  return {
    speciesId: r ? (r.speciesId ?? (r.speciesOther ? SPECIES_NOT_LISTED : "")) : (pre.speciesId ?? ""),
    speciesOther: s(r?.speciesOther),
    fishCount: s(r?.fishCount),
    sizeClass: s(r?.sizeClass),
    conditionSlug: s(r?.conditionSlug),
    startedOn: s(r?.startedOn),
    water: {
      volume: pre.volume ?? s(r?.water.volume),
      volumeUnit: pre.volumeUnit ?? r?.water.volumeUnit ?? "L",
      temperature: s(r?.water.temperature),
      temperatureUnit: r?.water.temperatureUnit ?? "C",
      ph: s(r?.water.ph),
      setting: s(r?.water.setting),
    },
    treatment: {
      agentSlug: pre.agentSlug ?? r?.treatment.agentSlug ?? "hydrogen-peroxide",
      stockFormId: pre.stockFormId ?? s(r?.treatment.stockFormId),
      stockPercent: pre.stockPercent ?? s(r?.treatment.stockPercent),
      stockBasis: pre.stockBasis ?? r?.treatment.stockBasis ?? "w/v",
      stockDensityGPerMl: s(r?.treatment.stockDensityGPerMl),
      amountMl: pre.amountMl ?? s(r?.treatment.amountMl),
      statedConcentration: pre.statedConcentration ?? s(r?.treatment.statedConcentration),
      doses: s(r?.treatment.doses ?? 1),
      intervalHours: pre.intervalHours ?? s(r?.treatment.intervalHours),
      otherTreatments: s(r?.treatment.otherTreatments),
    },
    outcome: {
      fishLost: s(r?.outcome.fishLost ?? (r ? null : 0)),
      lossCause: s(r?.outcome.lossCause),
      distress: s(r?.outcome.distress),
      condition: s(r?.outcome.condition),
      observedDaysAfter: s(r?.outcome.observedDaysAfter),
      notes: s(r?.outcome.notes),
    },
    showName: r?.showName ? "yes" : "no",
  };
}

interface ChecklistItem {
  field: string;
  step: number;
  text: string;
}
/** The server's issues, one per field, in step order; the messages are the schema's own plain sentences. */
function checklistOf(issues: { path: string; message: string }[]): ChecklistItem[] {
  const seen = new Set<string>();
  const items: ChecklistItem[] = [];
  for (const i of issues) {
    if (seen.has(i.path)) continue;
    seen.add(i.path);
    items.push({ field: i.path, step: stepOfPath(i.path), text: i.message });
  }
  return items.sort((x, y) => x.step - y.step);
}

/** The element id of a field: its path with dots as dashes. */
const fieldId = (fid: string, name: string) => `${fid}-${name.replace(/\./g, "-")}`;

function Fld({
  fid,
  error,
  name,
  label,
  hint,
  children,
}: {
  fid: string;
  error?: string;
  name: string;
  label: string;
  hint?: string;
  children: ReactNode;
}) {
  return (
    <div className="grid gap-1">
      <label htmlFor={fieldId(fid, name)} className="font-bold">
        {label}
      </label>
      {hint ? (
        <p id={`${fieldId(fid, name)}-hint`} className="text-sm text-peat-700">
          {hint}
        </p>
      ) : null}
      {children}
      {error ? (
        <p id={`${fieldId(fid, name)}-error`} className="text-sm font-bold text-alarm-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function ReportWizard({
  catalogue,
  report,
  step: initialStep,
  course,
  photos,
  prefill,
}: {
  catalogue: WizardCatalogue;
  report: WizardReport | null;
  step: number;
  course?: boolean;
  photos?: ReactNode;
  prefill?: WizardPrefill;
}) {
  const router = useRouter();
  const id = useId();
  const [step, setStep] = useState(Math.min(Math.max(initialStep, 0), steps.length - 1));
  const [banner, setBanner] = useState<string | null>(null);
  const [checklist, setChecklist] = useState<ChecklistItem[] | null>(null);
  const [busy, setBusy] = useState(false);
  const [speciesSearch, setSpeciesSearch] = useState("");
  const {
    register,
    control,
    handleSubmit,
    setValue,
    setError,
    formState: { errors },
  } = useForm<WizardValues, number>({
    defaultValues: initialValues(report, prefill ?? {}),
    resolver: wizardResolver,
    // The resolver checks the step on screen with that step's schema.
    context: step,
    // A message appears once a field has been left, or on "Save and continue"; then it follows each change.
    mode: "onTouched",
  });
  const [
    speciesId,
    agentSlug,
    stockFormId,
    stockPercent,
    stockBasis,
    stockDensity,
    amountMl,
    volume,
    volumeUnit,
    fishLost,
  ] = useWatch({
    control,
    name: [
      "speciesId",
      "treatment.agentSlug",
      "treatment.stockFormId",
      "treatment.stockPercent",
      "treatment.stockBasis",
      "treatment.stockDensityGPerMl",
      "treatment.amountMl",
      "water.volume",
      "water.volumeUnit",
      "outcome.fishLost",
    ],
  });
  const stepHeading = useRef<HTMLHeadingElement>(null);
  // Set when the keeper moves between steps (not on first load), so focus lands on the new step's heading. Kept in
  // sessionStorage because saving a new draft navigates to its edit page, which mounts a fresh wizard.
  useEffect(() => {
    // A save also refreshes the page, which may mount the wizard again: the mark holds for a few seconds.
    if (Number(sessionStorage.getItem(FOCUS_STEP_KEY) ?? 0) > Date.now()) stepHeading.current?.focus();
  }, [step]);
  const goTo = (n: number) => {
    markStepMove();
    setStep(n);
  };

  const agent = catalogue.agents.find((a) => a.slug === agentSlug);
  let preview: ReturnType<typeof planDose> | null = null;
  try {
    if (agent && num(amountMl) && num(stockPercent) && num(volume)) {
      // The same reading as the server's: a stock form counts only when named, never matched by its percentage.
      const preset = agent.stockForms.find((p) => p.id === stockFormId);
      const reading = readStrength({
        percent: num(stockPercent),
        basis: stockBasis as "w/v" | "w/w",
        densityGPerMl: num(stockDensity),
        preset: preset ? { ...preset, compound: preset.compound ?? null } : null,
      });
      preview = planDose({
        agentSlug: agent.slug,
        unit: agent.unit,
        stock: {
          percent: reading.percent,
          basis: reading.basis,
          densityGPerMl: reading.densityGPerMl,
          activeFraction: reading.activeFraction,
        },
        water: { kind: "volume", volume: num(volume)!, unit: volumeUnit as (typeof volumeUnits)[number] },
        addedMl: num(amountMl),
      });
    }
  } catch {
    preview = null;
  }
  const previewWarnings =
    preview && agent
      ? doseWarnings({
          unit: agent.unit,
          ceiling: agent.plausibleCeiling ?? null,
          doses: [{ label: "that dose", concentration: preview.concentration }],
        })
      : [];

  const matches = useMemo(() => {
    const q = speciesSearch.trim().toLowerCase();
    const list = q
      ? catalogue.species.filter((x) => `${x.commonName} ${x.scientificName}`.toLowerCase().includes(q))
      : catalogue.species;
    return list.slice(0, 200);
  }, [speciesSearch, catalogue.species]);

  async function save(values: WizardValues, next: number) {
    setBanner(null);
    setBusy(true);
    const patch = stepPatch(step, values);
    try {
      let reportId = report?.id;
      if (!reportId) {
        const carried =
          prefill && Object.values(prefill).some(Boolean) ? { ...stepPatch(1, values), ...stepPatch(2, values) } : {};
        const created = await fetchJson<{ id: string }>("/api/reports/drafts", {
          method: "POST",
          body: JSON.stringify({ ...carried, ...patch, ...(course ? { courseOpen: true } : {}) }),
        });
        reportId = created.id;
      } else if (step < 4) {
        await fetchJson(`/api/reports/${reportId}`, { method: "PATCH", body: JSON.stringify(patch) });
      }
      markStepMove();
      router.replace(`/reports/${reportId}/edit?step=${next}`);
      router.refresh();
      setStep(next);
    } catch (err) {
      const issues = err instanceof ApiError ? (err.body.issues ?? []) : [];
      // The server's answer lands on the fields it names; the first of them gets the cursor.
      issues.forEach((i, n) =>
        setError(i.path as FieldPath<WizardValues>, { type: "server", message: i.message }, { shouldFocus: n === 0 }),
      );
      setBanner(
        err instanceof ApiError ? err.message : "The draft could not be saved; check your connection and try again.",
      );
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
  const errorOf = (name: FieldPath<WizardValues>): string | undefined =>
    (get(errors, name) as { message?: string } | undefined)?.message;
  /** An input's props: the form's registration, its id, and its error and hint tied to it for screen readers. */
  const field = (name: FieldPath<WizardValues>, opts: { hint?: boolean; onChange?: (value: string) => void } = {}) => {
    const error = errorOf(name);
    const describedBy = [opts.hint ? `${fieldId(id, name)}-hint` : null, error ? `${fieldId(id, name)}-error` : null]
      .filter(Boolean)
      .join(" ");
    return {
      ...register(name, opts.onChange ? { onChange: (e) => opts.onChange!(String(e.target.value)) } : undefined),
      id: fieldId(id, name),
      className: input,
      "aria-invalid": error ? true : undefined,
      "aria-describedby": describedBy || undefined,
    };
  };
  const fld = (name: FieldPath<WizardValues>) => ({ fid: id, name, error: errorOf(name) });
  const onSave = handleSubmit(
    (values) => save(values, step + 1),
    () => setBanner("Some answers need fixing before you go on; each one says what to change."),
  );

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
      {banner ? (
        <p role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">
          {banner}
        </p>
      ) : null}
      {checklist ? (
        <div
          role="alert"
          className="grid gap-2 rounded-md border-l-4 border-alarm-500 bg-alarm-100 p-4"
          data-testid="submit-checklist"
        >
          <p className="font-bold text-alarm-700">
            The report is not submitted yet:{" "}
            {checklist.length === 1 ? "one thing is" : `${checklist.length} things are`} missing or need fixing.
          </p>
          <ul className="grid gap-1">
            {checklist.map((c) => (
              <li key={c.field}>
                <button
                  type="button"
                  className="text-left underline"
                  onClick={() => {
                    setStep(c.step);
                    if (c.step < 4) setError(c.field as FieldPath<WizardValues>, { type: "server", message: c.text });
                    // After the step renders, put the cursor in the field to fix.
                    setTimeout(() => document.getElementById(fieldId(id, c.field))?.focus(), 0);
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
      <form
        className="grid max-w-2xl gap-4"
        onSubmit={(e) => {
          if (step < 4) void onSave(e);
          else e.preventDefault();
        }}
        noValidate
        aria-label={steps[step]}
      >
        {step === 0 ? (
          <>
            <Fld
              {...fld("speciesId")}
              label="Species"
              hint="Type to narrow the list; choose “not listed” if yours is missing."
            >
              <input
                type="search"
                aria-label="Search species"
                placeholder="Search by common or scientific name"
                className={input}
                value={speciesSearch}
                onChange={(e) => setSpeciesSearch(e.target.value)}
              />
              <select {...field("speciesId", { hint: true })} size={6}>
                <option value={SPECIES_NOT_LISTED}>Not listed — I will name it</option>
                {matches.map((x) => (
                  <option key={x.id} value={x.id}>
                    {x.commonName} ({x.scientificName})
                  </option>
                ))}
              </select>
            </Fld>
            {speciesId === SPECIES_NOT_LISTED ? (
              <Fld
                {...fld("speciesOther")}
                label="Species, as you know it"
                hint="A moderator will match it to the catalogue."
              >
                <input {...field("speciesOther", { hint: true })} />
              </Fld>
            ) : null}
            <div className="grid grid-cols-2 gap-4">
              <Fld {...fld("fishCount")} label="Fish treated">
                <input {...field("fishCount")} inputMode="numeric" />
              </Fld>
              <Fld {...fld("sizeClass")} label="Size">
                <select {...field("sizeClass")}>
                  <option value="">Choose…</option>
                  {sizeClasses.map((x) => (
                    <option key={x} value={x}>
                      {labels[x]}
                    </option>
                  ))}
                </select>
              </Fld>
            </div>
            <Fld {...fld("conditionSlug")} label="Condition treated">
              <select {...field("conditionSlug")}>
                <option value="">Choose…</option>
                {catalogue.conditions.map((c) => (
                  <option key={c.slug} value={c.slug}>
                    {c.name}
                  </option>
                ))}
              </select>
            </Fld>
            <Fld {...fld("startedOn")} label="Course started on">
              <input {...field("startedOn")} type="date" />
            </Fld>
          </>
        ) : null}

        {step === 1 ? (
          <>
            <div className="grid grid-cols-2 gap-4">
              <Fld {...fld("water.volume")} label="Water volume treated">
                <input {...field("water.volume")} inputMode="decimal" />
              </Fld>
              <Fld {...fld("water.volumeUnit")} label="Volume unit">
                <select {...field("water.volumeUnit")}>
                  {volumeUnits.map((u) => (
                    <option key={u} value={u}>
                      {volumeUnitLabels[u]}
                    </option>
                  ))}
                </select>
              </Fld>
              <Fld {...fld("water.temperature")} label="Water temperature">
                <input {...field("water.temperature")} inputMode="decimal" />
              </Fld>
              <Fld {...fld("water.temperatureUnit")} label="Temperature unit">
                <select {...field("water.temperatureUnit")}>
                  <option value="C">°C</option>
                  <option value="F">°F</option>
                </select>
              </Fld>
            </div>
            <Fld {...fld("water.ph")} label="pH (optional)">
              <input {...field("water.ph")} inputMode="decimal" />
            </Fld>
            <Fld {...fld("water.setting")} label="Kind of tank">
              <select {...field("water.setting")}>
                <option value="">Choose…</option>
                {settings.map((x) => (
                  <option key={x} value={x}>
                    {labels[x]}
                  </option>
                ))}
              </select>
            </Fld>
          </>
        ) : null}

        {step === 2 ? (
          <>
            <Fld {...fld("treatment.agentSlug")} label="Treatment">
              <select {...field("treatment.agentSlug")}>
                {catalogue.agents.map((x) => (
                  <option key={x.slug} value={x.slug}>
                    {x.name}
                  </option>
                ))}
              </select>
            </Fld>
            <Fld
              {...fld("treatment.stockFormId")}
              label="Stock bottle"
              hint="A listed bottle says what its percentage is of (for example a compound, of which only part is the active); a typed strength counts the active itself."
            >
              <select
                {...field("treatment.stockFormId", {
                  hint: true,
                  onChange: (value) => {
                    const p = agent?.stockForms.find((x) => x.id === value);
                    if (!p) return;
                    setValue("treatment.stockPercent", String(p.percent));
                    setValue("treatment.stockBasis", p.basis);
                    setValue("treatment.stockDensityGPerMl", "");
                  },
                })}
              >
                <option value="">Another strength (type it below)</option>
                {agent?.stockForms.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.label}
                  </option>
                ))}
              </select>
            </Fld>
            <Fld
              {...fld("treatment.stockPercent")}
              label="Stock strength (%)"
              hint={
                agent
                  ? `Common strengths: ${agent.stockForms.map((p) => `${p.percent} % ${p.basis}`).join(", ")}.`
                  : undefined
              }
            >
              <input {...field("treatment.stockPercent", { hint: Boolean(agent) })} inputMode="decimal" />
            </Fld>
            <div className="grid grid-cols-2 gap-4">
              <Fld {...fld("treatment.stockBasis")} label="Strength basis">
                <select {...field("treatment.stockBasis")}>
                  <option value="w/v">w/v (g per 100 mL)</option>
                  <option value="w/w">w/w (g per 100 g)</option>
                </select>
              </Fld>
              <Fld {...fld("treatment.stockDensityGPerMl")} label="Density, g/mL (w/w only, if not a listed strength)">
                <input {...field("treatment.stockDensityGPerMl")} inputMode="decimal" />
              </Fld>
              <Fld {...fld("treatment.amountMl")} label="mL added per dose (largest dose)">
                <input {...field("treatment.amountMl")} inputMode="decimal" />
              </Fld>
              <Fld
                {...fld("treatment.statedConcentration")}
                label={`Concentration you aimed for (${agent?.unit ?? "mg/L"}), optional`}
              >
                <input {...field("treatment.statedConcentration")} inputMode="decimal" />
              </Fld>
              <Fld {...fld("treatment.doses")} label="Number of doses">
                <input {...field("treatment.doses")} inputMode="numeric" />
              </Fld>
              <Fld {...fld("treatment.intervalHours")} label="Hours between doses">
                <input {...field("treatment.intervalHours")} inputMode="decimal" />
              </Fld>
            </div>
            {preview ? (
              <p className="rounded-md bg-peat-50 p-3" data-testid="computed-dose">
                That dose makes{" "}
                <strong>
                  {preview.concentration.toFixed(preview.concentration >= 10 ? 1 : 2)} {agent?.unit}
                </strong>{" "}
                in your water (computed from amount, strength and volume).
              </p>
            ) : null}
            {previewWarnings.map((w) => (
              <p key={w.code} role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">
                {w.message} If the figures are right, say so in the notes.
              </p>
            ))}
            <Fld {...fld("treatment.otherTreatments")} label="Other treatments at the same time (optional)">
              <input {...field("treatment.otherTreatments")} />
            </Fld>
          </>
        ) : null}

        {step === 3 ? (
          <>
            <div className="grid grid-cols-2 gap-4">
              <Fld {...fld("outcome.fishLost")} label="Fish lost">
                <input {...field("outcome.fishLost")} inputMode="numeric" />
              </Fld>
              {num(fishLost) ? (
                <Fld {...fld("outcome.lossCause")} label="Likely cause of the losses">
                  <select {...field("outcome.lossCause")}>
                    <option value="">Choose…</option>
                    {lossCauses.map((x) => (
                      <option key={x} value={x}>
                        {labels[x]}
                      </option>
                    ))}
                  </select>
                </Fld>
              ) : (
                <div />
              )}
            </div>
            <Fld {...fld("outcome.distress")} label="Distress seen after dosing">
              <select {...field("outcome.distress")}>
                <option value="">Choose…</option>
                {distressLevels.map((x) => (
                  <option key={x} value={x}>
                    {labels[x]}
                  </option>
                ))}
              </select>
            </Fld>
            <Fld {...fld("outcome.condition")} label="How the condition ended">
              <select {...field("outcome.condition")}>
                <option value="">Choose…</option>
                {conditionOutcomes.map((x) => (
                  <option key={x} value={x}>
                    {labels[x]}
                  </option>
                ))}
              </select>
            </Fld>
            <Fld {...fld("outcome.observedDaysAfter")} label="Days watched after the last dose">
              <input {...field("outcome.observedDaysAfter")} inputMode="numeric" />
            </Fld>
            <Fld {...fld("outcome.notes")} label="Notes (optional)">
              <textarea {...field("outcome.notes")} rows={4} />
            </Fld>
            <fieldset className="grid gap-1">
              <legend className="font-bold">Show my display name on this report?</legend>
              <label className="flex items-center gap-2">
                <input type="radio" value="yes" {...register("showName")} /> Yes, show my name
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" value="no" {...register("showName")} /> No, keep it to the moderators
              </label>
            </fieldset>
          </>
        ) : null}

        {step === 4 && report ? (
          <>
            {photos}
            <div className="flex gap-3">
              <button
                type="button"
                onClick={() => void submit()}
                disabled={busy}
                className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:bg-peat-300"
              >
                {busy ? "Submitting…" : "Submit for review"}
              </button>
              <button
                type="button"
                onClick={() => router.push(`/reports/${report.id}`)}
                className="rounded-md border border-peat-300 px-4 py-2"
              >
                Keep as draft
              </button>
            </div>
          </>
        ) : null}

        {step < 4 ? (
          <div className="flex gap-3">
            {step > 0 ? (
              <button
                type="button"
                onClick={() => goTo(step - 1)}
                className="rounded-md border border-peat-300 px-4 py-2"
              >
                Back
              </button>
            ) : null}
            <button
              type="submit"
              disabled={busy}
              className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white disabled:bg-peat-300"
            >
              {busy ? "Saving…" : "Save and continue"}
            </button>
          </div>
        ) : null}
        <p className="text-sm text-peat-700">
          Each step is saved as a draft: you can close the page and come back from My reports.
        </p>
      </form>
    </div>
  );
}
