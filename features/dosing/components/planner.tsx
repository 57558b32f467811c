"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useQuery } from "@tanstack/react-query";
import { useSearchParams } from "next/navigation";
import { useEffect, useId, useMemo, useState } from "react";
import { Field } from "@/features/shared/components/ui";
import { useNow } from "@/features/shared/components/use-now";
import { useForm, useWatch, type Resolver } from "react-hook-form";
import { courseSchedule, planDose, type CourseItem, type Plan, type VolumeInput } from "../plan";
import { planDrySalt, type DryPlan } from "../dry-salt";
import { DosingInputError } from "../concentration";
import {
  cautiousPlan,
  doseWarnings,
  floorSig3,
  suggestFirstDose,
  type DoseWarning,
  type GuardEvidence,
} from "../guard-rails";
import { doseQuerySchema, type DoseQuery } from "../schemas";
import { readStrength } from "../stock-reading";
import { volumeUnitLabels, volumeUnits, type LengthUnit, type VolumeUnit } from "../units";
import type { StockBasis } from "../concentration";

export interface PlannerStock {
  id: string;
  label: string;
  percent: number;
  basis: StockBasis;
  densityGPerMl: number | null;
  activeFraction: number;
  compound: string | null;
}

export interface PlannerAgent {
  slug: string;
  name: string;
  unit: "mg/L" | "g/L";
  plausibleCeiling: number;
  redoseHours: number | null;
  watchDays: number;
  description: string;
  stockForms: PlannerStock[];
}

export interface PlannerFish {
  species: { id: string; commonName: string; scientificName: string; groupSlug: string }[];
  groups: { slug: string; name: string }[];
}

/** A group's evidence as /api/summaries/:group answers it (the Summary fields the planner shows). */
type GroupEvidence = GuardEvidence & {
  members: number;
  fish: number;
  tolerated: number;
  toleratedShare: { value: number | null; low: number | null; high: number | null };
  toleratedDose: GuardEvidence["toleratedDose"] & {
    medianInterval: { low: number; high: number; coverage: number } | null;
  };
  confidenceLevel: number;
};

const UNITS_KEY = "tanklore.planner.units";
const fmt = (n: number, digits = 2) =>
  n.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: 0 });
const fmtSig = (n: number) => (Math.abs(n) >= 100 ? fmt(n, 0) : Math.abs(n) >= 10 ? fmt(n, 1) : fmt(n, 2));
const pct = (v: number | null) => (v == null ? "–" : `${fmt(v * 100, 0)} %`);

const fractions = [
  { value: "1", label: "Full dose" },
  { value: "0.5", label: "Half (½) — a cautious first dose" },
  { value: "0.3333333333333333", label: "Third (⅓) — for sensitive fish" },
  { value: "custom", label: "Another fraction…" },
];

/** The form as typed: strings, turned into the API's query by toQuery and checked by the API's own schema. */
interface PlannerValues {
  fishText: string;
  speciesId: string;
  group: string;
  agent: string;
  /** For salt (g/L): poured as brine from a bottle, or weighed dry. */
  saltForm: "stock" | "dry";
  stockFormId: string;
  stockPercent: string;
  basis: StockBasis;
  densityGPerMl: string;
  volumeMode: "volume" | "dimensions";
  volume: string;
  volumeUnit: VolumeUnit;
  length: string;
  width: string;
  depth: string;
  lengthUnit: LengthUnit;
  displacementPercent: string;
  mode: "target" | "added";
  target: string;
  addedMl: string;
  addedGrams: string;
  fractionChoice: string;
  fraction: string;
}

const blank = (s: string | undefined) => (s ?? "").trim() === "";
const numText = (s: string | undefined) => (blank(s) ? undefined : s!.trim().replace(",", "."));

/** The GET /api/dose query these form values stand for (blank fields left out), so one schema judges both. */
export function toQuery(v: Partial<PlannerValues>): Record<string, string | undefined> {
  const q: Record<string, string | undefined> = { agent: v.agent };
  const dry = v.saltForm === "dry";
  if (dry) q.form = "dry";
  else if (!blank(v.stockFormId)) q.stockFormId = v.stockFormId;
  else {
    q.stockPercent = numText(v.stockPercent) ?? "";
    q.basis = v.basis;
    if (v.basis === "w/w") q.densityGPerMl = numText(v.densityGPerMl);
  }
  if (v.volumeMode === "dimensions") {
    for (const f of ["length", "width", "depth"] as const) q[f] = numText(v[f]) ?? "";
    q.lengthUnit = v.lengthUnit;
    q.displacementPercent = numText(v.displacementPercent);
  } else {
    q.volume = numText(v.volume) ?? "";
    q.volumeUnit = v.volumeUnit;
  }
  if (v.mode === "added" && dry) q.addedGrams = numText(v.addedGrams) ?? "";
  else if (v.mode === "added") q.addedMl = numText(v.addedMl) ?? "";
  else q.target = numText(v.target) ?? "";
  q.fraction = v.fractionChoice === "custom" ? (numText(v.fraction) ?? "") : v.fractionChoice;
  if (!blank(v.speciesId)) q.speciesId = v.speciesId;
  else if (!blank(v.group)) q.group = v.group;
  // An empty required field stays "" so the schema names it; empty optional ones are dropped.
  for (const k of Object.keys(q)) if (q[k] === undefined) delete q[k];
  return q;
}

const doseResolver = zodResolver(doseQuerySchema);
/** The API's schema over the form: field names are the query's, so its messages land on the right inputs. */
const plannerResolver: Resolver<PlannerValues> = async (values, context, options) => {
  const result = await doseResolver(toQuery(values) as never, context, options as never);
  return { values: result.errors && Object.keys(result.errors).length ? {} : values, errors: result.errors } as Awaited<
    ReturnType<Resolver<PlannerValues>>
  >;
};

const fishLabel = (s: PlannerFish["species"][number]) => `${s.commonName} (${s.scientificName})`;

export function Planner({
  agents,
  fish,
  firstDoseFraction,
}: {
  agents: PlannerAgent[];
  fish: PlannerFish;
  firstDoseFraction: number;
}) {
  const params = useSearchParams();
  const id = useId();
  const initialAgent = agents.find((a) => a.slug === params.get("agent")) ?? agents[0]!;
  const initialFraction = params.get("fraction");
  const initialGroup = fish.groups.find((g) => g.slug === params.get("group"));
  const { register, control, setValue, handleSubmit, formState } = useForm<PlannerValues>({
    mode: "onTouched",
    resolver: plannerResolver,
    defaultValues: {
      fishText: initialGroup ? `${initialGroup.name} (group)` : "",
      speciesId: "",
      group: initialGroup?.slug ?? "",
      agent: initialAgent.slug,
      saltForm: initialAgent.unit === "g/L" && params.get("form") === "dry" ? "dry" : "stock",
      stockFormId: initialAgent.stockForms[0]?.id ?? "",
      stockPercent: "3",
      basis: "w/v",
      densityGPerMl: "",
      volumeMode: "volume",
      volume: "",
      volumeUnit: "L",
      length: "",
      width: "",
      depth: "",
      lengthUnit: "cm",
      displacementPercent: "0",
      mode: "target",
      target: params.get("target") ?? "",
      addedMl: "",
      addedGrams: "",
      fractionChoice: initialFraction
        ? (fractions.find((f) => f.value !== "custom" && Math.abs(Number(f.value) - Number(initialFraction)) < 1e-6)
            ?.value ?? "custom")
        : "0.5",
      fraction: initialFraction ?? "0.5",
    },
  });
  const values = useWatch({ control }) as PlannerValues;
  const [doses, setDoses] = useState("3");
  // The first dose defaults to this hour (read from the clock once mounted), until the keeper picks a time.
  const [pickedStart, setStart] = useState<string | null>(null);
  const now = useNow();
  const start = pickedStart ?? (now == null ? "" : thisHourLocal(now));
  const [acknowledged, setAcknowledged] = useState<string | null>(null);
  const groupName = params.get("groupName");
  const agent = agents.find((a) => a.slug === values.agent) ?? agents[0]!;

  // Units follow the visitor's last choice on this device.
  useEffect(() => {
    try {
      const saved = JSON.parse(localStorage.getItem(UNITS_KEY) ?? "{}");
      if (volumeUnits.includes(saved.volumeUnit)) setValue("volumeUnit", saved.volumeUnit);
      if (saved.lengthUnit === "cm" || saved.lengthUnit === "in") setValue("lengthUnit", saved.lengthUnit);
      if (saved.volumeMode === "volume" || saved.volumeMode === "dimensions") setValue("volumeMode", saved.volumeMode);
    } catch {
      // Nothing saved, or storage is off: keep the defaults.
    }
  }, [setValue]);
  useEffect(() => {
    try {
      localStorage.setItem(
        UNITS_KEY,
        JSON.stringify({ volumeUnit: values.volumeUnit, lengthUnit: values.lengthUnit, volumeMode: values.volumeMode }),
      );
    } catch {
      // Storage off: units are simply not remembered.
    }
  }, [values.volumeUnit, values.lengthUnit, values.volumeMode]);

  const groupSlug = values.speciesId
    ? fish.species.find((s) => s.id === values.speciesId)?.groupSlug
    : values.group || undefined;
  const evidenceQuery = useQuery({
    queryKey: ["planner-evidence", groupSlug, agent.slug],
    enabled: Boolean(groupSlug),
    queryFn: async (): Promise<GroupEvidence> => {
      const r = await fetch(`/api/summaries/${encodeURIComponent(groupSlug!)}?agent=${encodeURIComponent(agent.slug)}`);
      if (!r.ok) throw new Error("The club's evidence could not be loaded.");
      return r.json();
    },
  });
  const evidence = groupSlug ? (evidenceQuery.data ?? null) : undefined;

  const stock = agent.stockForms.find((s) => s.id === values.stockFormId);
  const query = useMemo(() => doseQuerySchema.safeParse(toQuery(values)), [values]);
  const { plan, problem } = useMemo((): { plan: Plan | DryPlan | null; problem: string | null } => {
    if (!query.success) return { plan: null, problem: null };
    const q: DoseQuery = query.data;
    try {
      if (q.form === "dry") {
        const water: VolumeInput =
          q.volume !== undefined
            ? { kind: "volume", volume: q.volume, unit: q.volumeUnit! }
            : {
                kind: "dimensions",
                length: q.length!,
                width: q.width!,
                depth: q.depth!,
                unit: q.lengthUnit!,
                displacementPercent: q.displacementPercent,
              };
        return {
          plan: planDrySalt({
            agentSlug: agent.slug,
            unit: agent.unit,
            water,
            target: q.target,
            addedGrams: q.addedGrams,
            fraction: q.fraction,
          }),
          problem: null,
        };
      }
      const reading = readStrength({
        percent: q.stockPercent,
        basis: q.basis,
        densityGPerMl: q.densityGPerMl,
        preset: stock ?? null,
      });
      const water: VolumeInput =
        q.volume !== undefined
          ? { kind: "volume", volume: q.volume, unit: q.volumeUnit! }
          : {
              kind: "dimensions",
              length: q.length!,
              width: q.width!,
              depth: q.depth!,
              unit: q.lengthUnit!,
              displacementPercent: q.displacementPercent,
            };
      const plan = planDose({
        agentSlug: agent.slug,
        unit: agent.unit,
        stock: {
          percent: reading.percent,
          basis: reading.basis,
          densityGPerMl: reading.densityGPerMl,
          activeFraction: reading.activeFraction,
        },
        water,
        target: q.target,
        addedMl: q.addedMl,
        fraction: q.fraction,
      });
      return { plan, problem: null };
    } catch (failure) {
      if (failure instanceof DosingInputError) return { plan: null, problem: failure.message };
      throw failure;
    }
  }, [query, stock, agent]);

  const n = agent.redoseHours ? Math.min(10, Math.max(1, Math.floor(Number(doses) || 1))) : 1;
  const startDate = start ? new Date(start) : null;
  const items =
    plan && startDate && !Number.isNaN(startDate.getTime())
      ? courseSchedule(plan, startDate, n, agent.redoseHours, agent.watchDays)
      : [];
  const warnings: DoseWarning[] = plan
    ? doseWarnings({
        unit: agent.unit,
        ceiling: agent.plausibleCeiling,
        evidence: groupSlug ? (evidenceQuery.isSuccess ? evidence : undefined) : undefined,
        doses: [
          {
            label: plan.target !== null ? "the target" : "the concentration your mL make",
            concentration: plan.concentration,
          },
          ...(plan.firstDose ? [{ label: "the first dose", concentration: plan.firstDose.concentration }] : []),
          ...items
            .filter((i) => i.kind === "dose")
            .map((i) => ({
              label: i.label.replace(/^Dose (\d+) of \d+$/, "dose $1"),
              concentration: i.concentration!,
            })),
        ],
      })
    : [];
  // Where the group has a fitted dose–response, /api/dose reads the chance the planned dose goes badly from it (the
  // fit lives in the evidence feature, above this one, so the server works it out).
  const riskUrl =
    plan && query.success && groupSlug && evidenceQuery.isSuccess && evidence?.doseResponse?.bmdl != null
      ? `/api/dose?${new URLSearchParams(toQuery(values) as Record<string, string>)}`
      : null;
  const riskQuery = useQuery({
    queryKey: ["planner-risk", riskUrl],
    enabled: riskUrl !== null,
    placeholderData: (previous) => previous,
    queryFn: async (): Promise<DoseRisk | null> => {
      const r = await fetch(riskUrl!);
      if (!r.ok) throw new Error("The fitted chance could not be loaded.");
      return ((await r.json()) as { risk?: DoseRisk | null }).risk ?? null;
    },
  });
  const risk = riskUrl !== null ? (riskQuery.data ?? null) : null;
  const warningKey = warnings.map((w) => w.message).join("|");
  const cleared = warnings.length === 0 || acknowledged === warningKey;
  const suggested = suggestFirstDose(evidence ?? null, firstDoseFraction);
  const cautious = cautiousPlan(evidence ?? null, firstDoseFraction);

  const errorOf = (name: keyof PlannerValues) => formState.errors[name]?.message;
  const field = (name: keyof PlannerValues) => ({
    id: `${id}-${name}`,
    "aria-invalid": errorOf(name) ? true : undefined,
    "aria-describedby": errorOf(name) ? `${id}-${name}-error` : undefined,
  });
  const err = (name: keyof PlannerValues) =>
    errorOf(name) ? (
      <p id={`${id}-${name}-error`} className="text-sm font-bold text-alarm-700">
        {errorOf(name)}
      </p>
    ) : null;
  const input =
    "w-full min-w-0 rounded-md border border-peat-300 bg-white px-3 py-2 aria-[invalid=true]:border-alarm-500";

  const chooseFish = (text: string) => {
    const sp = fish.species.find(
      (s) =>
        fishLabel(s).toLowerCase() === text.trim().toLowerCase() ||
        s.commonName.toLowerCase() === text.trim().toLowerCase() ||
        s.scientificName.toLowerCase() === text.trim().toLowerCase(),
    );
    const g = fish.groups.find(
      (x) =>
        `${x.name} (group)`.toLowerCase() === text.trim().toLowerCase() ||
        x.name.toLowerCase() === text.trim().toLowerCase(),
    );
    setValue("speciesId", sp?.id ?? "");
    setValue("group", sp ? "" : (g?.slug ?? ""));
  };
  const useSuggestion = () => {
    // The shared cautious plan: the median as the full dose only where fish have not fared badly at or below it;
    // otherwise every dose at the held first dose.
    if (!cautious) return;
    setValue("mode", "target");
    setValue("target", String(cautious.target), { shouldValidate: true });
    const preset = fractions.find((x) => x.value !== "custom" && Math.abs(Number(x.value) - cautious.fraction) < 1e-6);
    setValue("fractionChoice", preset?.value ?? "custom");
    setValue("fraction", preset?.value ?? String(Number(cautious.fraction.toPrecision(3))), { shouldValidate: true });
  };
  const icsHref =
    query.success && startDate && !Number.isNaN(startDate.getTime())
      ? `/api/dose/plan.ics?${new URLSearchParams({ ...(toQuery(values) as Record<string, string>), start: startDate.toISOString(), doses: String(n) })}`
      : null;

  return (
    <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <form
        className="grid min-w-0 content-start gap-6 no-print"
        onSubmit={handleSubmit(() => undefined)}
        aria-label="Dose planner"
        noValidate
      >
        {groupName ? (
          <p className="rounded-md bg-peat-50 p-3 text-sm">
            Prefilled from the club&apos;s evidence for <strong>{groupName}</strong>. Check every figure against your
            own tank.
          </p>
        ) : null}
        <fieldset className="grid min-w-0 gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">1. Your fish and the treatment</legend>
          <label htmlFor={`${id}-fishText`} className="font-bold">
            Fish being treated
          </label>
          <input
            {...register("fishText", { onChange: (e) => chooseFish(e.target.value) })}
            id={`${id}-fishText`}
            list={`${id}-fish-list`}
            className={input}
            placeholder="Type a common or scientific name, or a group"
            autoComplete="off"
            aria-describedby={`${id}-fish-hint`}
          />
          <datalist id={`${id}-fish-list`}>
            {fish.species.map((s) => (
              <option key={s.id} value={fishLabel(s)} />
            ))}
            {fish.groups.map((g) => (
              <option key={g.slug} value={`${g.name} (group)`} />
            ))}
          </datalist>
          <p id={`${id}-fish-hint`} className="text-sm text-peat-700">
            {groupSlug
              ? `Group: ${fish.groups.find((g) => g.slug === groupSlug)?.name ?? groupSlug}.`
              : "Optional, but the club's evidence for your fish is shown once you choose them."}
          </p>
          <label htmlFor={`${id}-agent`} className="font-bold">
            Treatment
          </label>
          <select
            {...register("agent", {
              onChange: (e) => {
                const next = agents.find((a) => a.slug === e.target.value)!;
                setValue("stockFormId", next.stockForms[0]?.id ?? "");
                if (next.unit !== "g/L") setValue("saltForm", "stock");
                // A concentration of one treatment means nothing for another (25 mg/L of peroxide is not 25 g/L of salt).
                setValue("target", "");
                setValue("addedMl", "");
                setValue("addedGrams", "");
                setAcknowledged(null);
              },
            })}
            id={`${id}-agent`}
            className={input}
          >
            {agents.map((a) => (
              <option key={a.slug} value={a.slug}>
                {a.name}
              </option>
            ))}
          </select>
          <p className="text-sm text-peat-700">{agent.description}</p>
          {agent.unit === "g/L" ? (
            <div className="flex flex-wrap gap-4" role="radiogroup" aria-label="How you add the salt">
              <label className="flex items-center gap-2">
                <input type="radio" value="dry" {...register("saltForm", { onChange: () => setAcknowledged(null) })} />{" "}
                Dry salt, weighed in grams
              </label>
              <label className="flex items-center gap-2">
                <input
                  type="radio"
                  value="stock"
                  {...register("saltForm", { onChange: () => setAcknowledged(null) })}
                />{" "}
                Brine from a bottle, in mL
              </label>
            </div>
          ) : null}
          {values.saltForm !== "dry" ? (
            <>
              <label htmlFor={`${id}-stock`} className="font-bold">
                Stock strength
              </label>
              <select {...register("stockFormId")} id={`${id}-stock`} className={input}>
                {agent.stockForms.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.label}
                  </option>
                ))}
                <option value="">Another strength…</option>
              </select>
              {stock?.compound ? (
                <p className="text-sm text-peat-700">
                  The percentage is of {stock.compound}; doses are worked out as {agent.name.toLowerCase()} (
                  {fmt(stock.activeFraction * 100, 1)} % of its mass).
                </p>
              ) : null}
              {!stock ? (
                <div className="grid gap-3 sm:grid-cols-3">
                  <Field id={`${id}-stockPercent`} label="Strength (%)">
                    <input
                      {...register("stockPercent")}
                      {...field("stockPercent")}
                      inputMode="decimal"
                      className={input}
                    />
                  </Field>
                  <Field id={`${id}-basis`} label="Basis">
                    <select {...register("basis")} id={`${id}-basis`} className={input}>
                      <option value="w/v">w/v (g per 100 mL)</option>
                      <option value="w/w">w/w (g per 100 g)</option>
                    </select>
                  </Field>
                  <Field id={`${id}-densityGPerMl`} label="Density (g/mL)">
                    <input
                      {...register("densityGPerMl")}
                      {...field("densityGPerMl")}
                      inputMode="decimal"
                      className={input}
                      disabled={values.basis === "w/v"}
                    />
                  </Field>
                  <p className="text-sm text-peat-700 sm:col-span-3">
                    A strength typed here counts {agent.name.toLowerCase()} itself
                    {agent.unit === "mg/L" && values.basis === "w/v" ? " (1 % w/v = 10 mg per mL)" : ""}. If your bottle
                    gives the strength of a compound, choose its stock form above.
                  </p>
                  <div className="sm:col-span-3">
                    {err("stockPercent")}
                    {err("densityGPerMl")}
                  </div>
                </div>
              ) : null}
            </>
          ) : (
            <p className="text-sm text-peat-700">
              Weigh plain salt (no iodine or anti-caking agent) and dissolve it fully in a jug of tank water before
              adding it; 1 g/L is about 1 part per thousand.
            </p>
          )}
        </fieldset>

        {groupSlug ? (
          <EvidencePanel
            evidence={evidenceQuery.isSuccess ? evidence! : null}
            failed={evidenceQuery.isError}
            unit={agent.unit}
            agentName={agent.name}
            suggested={suggested}
            holdsEveryDose={cautious?.fraction === 1}
            onUse={useSuggestion}
          />
        ) : null}

        <fieldset className="grid min-w-0 gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">2. Water to treat</legend>
          <div className="flex flex-wrap gap-4" role="radiogroup" aria-label="How to give the water volume">
            <label className="flex items-center gap-2">
              <input type="radio" value="volume" {...register("volumeMode")} /> I know the volume
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" value="dimensions" {...register("volumeMode")} /> Work it out from the tank
            </label>
          </div>
          {values.volumeMode !== "dimensions" ? (
            <div className="grid grid-cols-2 gap-3">
              <Field id={`${id}-volume`} label="Water volume">
                <input {...register("volume")} {...field("volume")} inputMode="decimal" className={input} />
              </Field>
              <Field id={`${id}-volumeUnit`} label="Unit">
                <select {...register("volumeUnit")} id={`${id}-volumeUnit`} className={input}>
                  {volumeUnits.map((u) => (
                    <option key={u} value={u}>
                      {volumeUnitLabels[u]}
                    </option>
                  ))}
                </select>
              </Field>
              <div className="col-span-2">{err("volume")}</div>
            </div>
          ) : (
            <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
              {(["length", "width", "depth"] as const).map((d) => (
                <Field
                  key={d}
                  id={`${id}-${d}`}
                  label={d === "depth" ? "Water depth" : d === "length" ? "Length" : "Width"}
                >
                  <input {...register(d)} {...field(d)} inputMode="decimal" className={input} />
                </Field>
              ))}
              <Field id={`${id}-lengthUnit`} label="Unit">
                <select {...register("lengthUnit")} id={`${id}-lengthUnit`} className={input}>
                  <option value="cm">cm</option>
                  <option value="in">inches</option>
                </select>
              </Field>
              <div className="col-span-2 grid min-w-0 gap-1">
                <label htmlFor={`${id}-displacementPercent`} className="font-bold">
                  Less for gravel and decor (%)
                </label>
                <input
                  {...register("displacementPercent")}
                  {...field("displacementPercent")}
                  inputMode="decimal"
                  className={input}
                />
              </div>
              <div className="col-span-full">
                {err("length")}
                {err("width")}
                {err("depth")}
                {err("displacementPercent")}
              </div>
              <p className="col-span-full text-sm text-peat-700">
                Measure inside the glass; depth is of the water, not the tank.
              </p>
            </div>
          )}
        </fieldset>

        <fieldset className="grid min-w-0 gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">3. Dose</legend>
          <div className="flex flex-wrap gap-4" role="radiogroup" aria-label="What to work out">
            <label className="flex items-center gap-2">
              <input type="radio" value="target" {...register("mode")} /> How much do I add?
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" value="added" {...register("mode")} />{" "}
              {values.saltForm === "dry" ? "What did my grams make?" : "What did my mL make?"}
            </label>
          </div>
          {values.mode !== "added" ? (
            <Field id={`${id}-target`} label={`Target concentration (${agent.unit})`} error={errorOf("target")}>
              <input {...register("target")} {...field("target")} inputMode="decimal" className={input} />
            </Field>
          ) : values.saltForm === "dry" ? (
            <Field id={`${id}-addedGrams`} label="Grams of dry salt added" error={errorOf("addedGrams")}>
              <input {...register("addedGrams")} {...field("addedGrams")} inputMode="decimal" className={input} />
            </Field>
          ) : (
            <Field id={`${id}-addedMl`} label="Millilitres of stock added" error={errorOf("addedMl")}>
              <input {...register("addedMl")} {...field("addedMl")} inputMode="decimal" className={input} />
            </Field>
          )}
          <label htmlFor={`${id}-fractionChoice`} className="font-bold">
            First dose
          </label>
          <select {...register("fractionChoice")} id={`${id}-fractionChoice`} className={input}>
            {fractions.map((f) => (
              <option key={f.value} value={f.value}>
                {f.label}
              </option>
            ))}
          </select>
          {values.fractionChoice === "custom" ? (
            <Field id={`${id}-fraction`} label="Fraction of the full dose (0 to 1)" error={errorOf("fraction")}>
              <input {...register("fraction")} {...field("fraction")} inputMode="decimal" className={input} />
            </Field>
          ) : null}
          <button type="submit" className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold">
            Check my figures
          </button>
        </fieldset>
      </form>

      <section aria-labelledby={`${id}-result`} className="grid min-w-0 content-start gap-4">
        <h2 id={`${id}-result`} className="text-2xl font-bold text-peat-900">
          Your dose
        </h2>
        {plan && warnings.length ? (
          <div
            role="alert"
            className="grid gap-2 rounded-lg border-2 border-alarm-500 bg-alarm-100 p-4 text-alarm-700"
            data-testid="dose-warnings"
          >
            <p className="text-lg font-bold">Stop and read before you dose</p>
            <ul className="list-disc space-y-1 pl-5">
              {warnings.map((w) => (
                <li key={w.code} data-code={w.code}>
                  {w.message}
                </li>
              ))}
            </ul>
            <label className="flex items-start gap-2 font-bold no-print">
              <input
                type="checkbox"
                className="mt-1"
                checked={cleared}
                onChange={(e) => setAcknowledged(e.target.checked ? warningKey : null)}
              />
              I have read these warnings and will check the dose against my own fish and tank.
            </label>
          </div>
        ) : null}
        {risk ? <RiskNote risk={risk} unit={agent.unit} groupName={evidence?.group.name ?? "these fish"} /> : null}
        <div aria-live="polite" data-testid="planner-result">
          {plan && cleared ? (
            "form" in plan ? (
              <DryResult plan={plan} agent={agent} />
            ) : (
              <Result plan={plan} agent={agent} />
            )
          ) : plan ? (
            <p className="text-peat-700">Tick the box above to see the dose and the plan.</p>
          ) : problem ? (
            <p className="font-bold text-alarm-700">{problem}</p>
          ) : (
            <p className="text-peat-700">Fill in the steps; the result appears here as you type.</p>
          )}
        </div>
        {plan && cleared ? (
          <Checklist
            plan={plan}
            agent={agent}
            items={items}
            doses={doses}
            setDoses={setDoses}
            start={start}
            setStart={setStart}
            icsHref={icsHref}
            warnings={warnings}
          />
        ) : null}
        {plan && cleared && values.volumeMode !== "dimensions" ? (
          <a
            className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold no-underline no-print"
            href={`/reports/new?${courseParams(plan, agent, stock, values, warnings)}`}
          >
            Start a course log with this dose
          </a>
        ) : null}
      </section>
    </div>
  );
}

/** The start of the current hour as a datetime-local value in the browser's time zone. */
function thisHourLocal(now: number): string {
  const d = new Date(now);
  d.setMinutes(0, 0, 0);
  return new Date(d.getTime() - d.getTimezoneOffset() * 60000).toISOString().slice(0, 16);
}

/**
 * The new course form's address: the treatment and water the wizard fills in, plus the plan itself (fish, target,
 * first-dose share, form) so the course page can show the plan and the warnings acknowledged here.
 */
function courseParams(
  plan: Plan | DryPlan,
  agent: PlannerAgent,
  stock: PlannerStock | undefined,
  values: PlannerValues,
  warnings: DoseWarning[],
) {
  const p = new URLSearchParams({
    course: "1",
    agentSlug: agent.slug,
    volume: values.volume,
    volumeUnit: values.volumeUnit,
  });
  if ("form" in plan) {
    p.set("form", "dry");
    // Dry salt has no mL: the course carries the first dose's g/L, from which the log plans its grams.
    p.set("statedConcentration", String(Number((plan.firstDose ?? plan).concentration.toPrecision(4))));
  } else {
    if (stock) p.set("stockFormId", stock.id);
    p.set("stockPercent", String(stock ? stock.percent : values.stockPercent));
    p.set("stockBasis", stock ? stock.basis : values.basis);
    const first = (plan.firstDose ?? plan).measured.ml;
    if (first) p.set("amountMl", String(first));
  }
  if (agent.redoseHours) p.set("intervalHours", String(agent.redoseHours));
  if (values.speciesId) p.set("speciesId", values.speciesId);
  else if (values.group) p.set("group", values.group);
  p.set("target", String(Number(plan.concentration.toPrecision(4))));
  if (plan.firstDose) p.set("fraction", String(Number(plan.firstDose.fraction.toPrecision(4))));
  // The codes the keeper ticked off here; the course page works the messages out again from the plan.
  if (warnings.length) p.set("acknowledged", warnings.map((w) => w.code).join(","));
  return p;
}

/** The fitted chance that a dose goes badly, as GET /api/dose answers it. */
interface DoseRisk {
  dose: number;
  risk: number;
  low: number;
  high: number;
  level: number;
  extrapolated: boolean;
}

function RiskNote({ risk, unit, groupName }: { risk: DoseRisk; unit: string; groupName: string }) {
  return (
    <div className="grid gap-1 rounded-lg border border-peat-300 bg-white p-4" data-testid="planner-risk">
      <p className="text-sm font-bold uppercase tracking-wide text-peat-700">Chance this dose goes badly (anecdotal)</p>
      <p>
        At {fmtSig(risk.dose)} {unit}, the curve fitted to members&apos; reports for {groupName} puts the chance of a
        bad outcome at about <strong>{pct(risk.risk)}</strong> ({risk.level} % interval {pct(risk.low)}–{pct(risk.high)}
        ).
      </p>
      {risk.extrapolated ? (
        <p className="font-bold text-alarm-700">
          This dose lies outside the doses members reported: the figure is read from the curve beyond the reports and
          may be far off.
        </p>
      ) : null}
      <p className="text-sm text-peat-700">
        From self-selected reports, not a controlled study; a group mixes species. A low figure does not make a dose
        safe: start low, watch closely and ask an aquatic vet.
      </p>
    </div>
  );
}

function EvidencePanel({
  evidence,
  failed,
  unit,
  agentName,
  suggested,
  holdsEveryDose,
  onUse,
}: {
  evidence: GroupEvidence | null;
  failed: boolean;
  unit: string;
  agentName: string;
  suggested: ReturnType<typeof suggestFirstDose>;
  /** The usual dose is at or above where fish fared badly (or the BMDL): the plan keeps every dose at the first. */
  holdsEveryDose: boolean;
  onUse: () => void;
}) {
  if (failed)
    return (
      <p className="rounded-md bg-alarm-100 p-3 text-sm font-bold text-alarm-700">
        The club&apos;s evidence could not be loaded: plan without it, start low and watch closely.
      </p>
    );
  if (!evidence) return <p className="text-sm text-peat-700">Loading the club&apos;s evidence…</p>;
  const d = evidence.toleratedDose;
  const loud = evidence.lowestAdverseDose != null && d.median != null && evidence.lowestAdverseDose <= d.median;
  return (
    <section
      className="grid min-w-0 gap-2 rounded-lg border border-peat-300 bg-white p-4"
      aria-label="The club's evidence for these fish"
      data-testid="planner-evidence"
    >
      <h3 className="text-lg font-bold text-peat-900">
        What members reported: {evidence.group.name}, {agentName.toLowerCase()}
      </h3>
      {evidence.reports === 0 ? (
        <p className="font-bold">
          No accepted reports for these fish yet. Use your own target, start well below the usual dose, try a few fish
          first and ask an aquatic vet.
        </p>
      ) : (
        <>
          {evidence.sparse ? (
            <p className="font-bold text-alarm-700">
              Only {evidence.reports} report{evidence.reports === 1 ? "" : "s"}: too few to lean on.
            </p>
          ) : null}
          <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
            <dt className="font-bold">Reports</dt>
            <dd>
              {evidence.reports} from {evidence.members} member{evidence.members === 1 ? "" : "s"}, {evidence.fish} fish
            </dd>
            <dt className="font-bold">Tolerated</dt>
            <dd>
              {evidence.tolerated} of {evidence.reports} ({pct(evidence.toleratedShare.value)}; interval{" "}
              {pct(evidence.toleratedShare.low)}–{pct(evidence.toleratedShare.high)})
            </dd>
            <dt className="font-bold">Usual dose</dt>
            <dd>
              {d.median == null
                ? "none tolerated yet"
                : `${fmtSig(d.median)} ${unit} (median tolerated${d.medianInterval ? `; interval ${fmtSig(d.medianInterval.low)}–${fmtSig(d.medianInterval.high)}` : ""})`}
            </dd>
            <dt className="font-bold">Went badly at</dt>
            <dd className={loud ? "font-bold text-alarm-700" : undefined}>
              {evidence.lowestAdverseDose == null
                ? "no report"
                : `${fmtSig(evidence.lowestAdverseDose)} ${unit} (lowest)`}
            </dd>
          </dl>
          {loud ? (
            <p className="rounded-md bg-alarm-100 p-2 font-bold text-alarm-700">
              A dose at or below the usual dose has already gone badly for these fish.
            </p>
          ) : null}
          {suggested ? (
            <div className="flex flex-wrap items-center gap-3">
              <p className="text-sm">
                Suggested first dose:{" "}
                <strong>
                  {fmtSig(floorSig3(suggested.concentration))} {unit}
                </strong>
                {suggested.limitedBy === "median"
                  ? ` (${fmt(suggested.fraction * 100, 0)} % of the usual dose)`
                  : suggested.limitedBy === "lowest_adverse"
                    ? " (held below the lowest dose that went badly)"
                    : " (held at the fitted curve's lower limit)"}
                .
                {holdsEveryDose
                  ? " Planned from this, every dose stays at it: the usual dose is where fish of this group have already fared badly."
                  : null}
              </p>
              <button type="button" onClick={onUse} className="rounded-md border border-peat-500 px-3 py-1 font-bold">
                Plan from this
              </button>
            </div>
          ) : null}
        </>
      )}
    </section>
  );
}

function DryResult({ plan, agent }: { plan: DryPlan; agent: PlannerAgent }) {
  const u = agent.unit;
  const first = plan.firstDose && plan.firstDose.fraction < 1 ? plan.firstDose : null;
  return (
    <div className="grid gap-4">
      {first ? (
        <div className="rounded-lg border-2 border-peat-500 bg-white p-4">
          <p className="text-sm font-bold uppercase tracking-wide text-peat-700">
            First dose ({fmt(first.fraction * 100, 0)} % of the full dose)
          </p>
          <p className="mt-1 text-3xl font-bold" data-testid="first-dose-grams">
            {first.weighed.grams > 0 ? `${fmt(first.weighed.grams, 1)} g` : "too little to weigh"}
          </p>
          <p className="text-sm">
            exactly {fmtSig(first.doseGrams)} g of dry salt, giving {fmtSig(first.concentration)} {u}; weigh on a{" "}
            {first.weighed.tool}
          </p>
        </div>
      ) : null}
      <div className="rounded-lg border border-peat-300 bg-white p-4">
        <p className="text-sm font-bold uppercase tracking-wide text-peat-700">
          {plan.target !== null ? "Full dose of dry salt" : "What your salt makes"}
        </p>
        {plan.target !== null ? (
          <>
            <p className="mt-1 text-3xl font-bold" data-testid="dose-grams">
              {plan.weighed.grams > 0 ? `${fmt(plan.weighed.grams, 1)} g` : "too little to weigh"}
            </p>
            <p className="text-sm">
              exactly {fmtSig(plan.doseGrams)} g for {fmtSig(plan.concentration)} {u}; weigh on a {plan.weighed.tool},
              rounded down
            </p>
          </>
        ) : (
          <p className="mt-1 text-3xl font-bold" data-testid="concentration">
            {fmtSig(plan.concentration)} {u}
          </p>
        )}
        <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-4 text-sm">
          <dt className="font-bold">Water</dt>
          <dd data-testid="volume-l">{fmtSig(plan.volumeL)} L</dd>
          <dt className="font-bold">Salt</dt>
          <dd>dissolve it fully in tank water, then add it slowly</dd>
        </dl>
      </div>
    </div>
  );
}

function Result({ plan, agent }: { plan: Plan; agent: PlannerAgent }) {
  const u = agent.unit;
  const full = plan.measured;
  return (
    <div className="grid gap-4">
      {plan.firstDose && plan.firstDose.fraction < 1 ? (
        <div className="rounded-lg border-2 border-peat-500 bg-white p-4">
          <p className="text-sm font-bold uppercase tracking-wide text-peat-700">
            First dose ({fmt(plan.firstDose.fraction * 100, 0)} % of the full dose)
          </p>
          <p className="mt-1 text-3xl font-bold" data-testid="first-dose-ml">
            {plan.firstDose.measured.ml > 0 ? `${fmt(plan.firstDose.measured.ml)} mL` : "too little to measure"}
          </p>
          <p className="text-sm">
            exactly {fmtSig(plan.firstDose.doseMl)} mL, giving {fmtSig(plan.firstDose.concentration)} {u}; measure with
            a {plan.firstDose.measured.tool}
          </p>
        </div>
      ) : null}
      <div className="rounded-lg border border-peat-300 bg-white p-4">
        <p className="text-sm font-bold uppercase tracking-wide text-peat-700">
          {plan.target !== null ? "Full dose to add" : "What you added makes"}
        </p>
        {plan.target !== null ? (
          <>
            <p className="mt-1 text-3xl font-bold" data-testid="dose-ml">
              {full.ml > 0 ? `${fmt(full.ml)} mL` : "too little to measure"}
            </p>
            <p className="text-sm">
              exactly {fmtSig(plan.doseMl)} mL for {fmtSig(plan.concentration)} {u}; measure with a {full.tool}, rounded
              down to its marks
            </p>
          </>
        ) : (
          <p className="mt-1 text-3xl font-bold" data-testid="concentration">
            {fmtSig(plan.concentration)} {u}
          </p>
        )}
        <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-4 text-sm">
          <dt className="font-bold">Water</dt>
          <dd data-testid="volume-l">{fmtSig(plan.volumeL)} L</dd>
          <dt className="font-bold">Stock</dt>
          <dd>{fmtSig(plan.stockMgPerMl)} mg of active per mL</dd>
          {u === "g/L" ? (
            <>
              <dt className="font-bold">Or dry salt</dt>
              <dd data-testid="dry-grams">
                {fmtSig(plan.activeGrams)} g, dissolved in tank water before adding
                {plan.firstDose && plan.firstDose.fraction < 1
                  ? ` (first dose ${fmtSig(plan.activeGrams * plan.firstDose.fraction)} g)`
                  : ""}
              </dd>
            </>
          ) : null}
        </dl>
      </div>
      {full.ml === 0 ? (
        <p role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">
          This dose is below the smallest mark of a 1 mL syringe. Dilute the stock first (for example 1 part stock to 9
          parts water, then use ten times the millilitres).
        </p>
      ) : null}
      {plan.strengthRange ? (
        <p className="rounded-md bg-reed-100 p-3 text-sm">
          A bottle labelled{" "}
          {fmt(plan.strengthRange.lowPercent + (plan.strengthRange.highPercent - plan.strengthRange.lowPercent) / 2, 1)}{" "}
          % may hold between {fmt(plan.strengthRange.lowPercent, 1)} % and {fmt(plan.strengthRange.highPercent, 1)} % (
          {plan.strengthRange.source}), so this dose really gives between{" "}
          <strong>{fmtSig(plan.strengthRange.concentrationLow)}</strong> and{" "}
          <strong>
            {fmtSig(plan.strengthRange.concentrationHigh)} {u}
          </strong>
          . Old or opened bottles lose strength.
        </p>
      ) : null}
    </div>
  );
}

interface ChecklistProps {
  plan: Plan | DryPlan;
  agent: PlannerAgent;
  items: CourseItem[];
  doses: string;
  setDoses: (s: string) => void;
  start: string;
  setStart: (s: string) => void;
  icsHref: string | null;
  warnings: DoseWarning[];
}

function Checklist({ plan, agent, items, doses, setDoses, start, setStart, icsHref, warnings }: ChecklistProps) {
  const id = useId();
  return (
    <section
      className="grid min-w-0 gap-3 rounded-lg border border-peat-100 bg-white p-4"
      aria-labelledby={`${id}-plan`}
    >
      <h3 id={`${id}-plan`} className="text-xl font-bold text-peat-900">
        Dosing and watching plan
      </h3>
      <p className="text-sm">
        {agent.redoseHours
          ? `Common practice for ${agent.name.toLowerCase()}: a dose every ${agent.redoseHours} hours, then at least ${agent.watchDays} days of watching after the last one (common practice, no published source).`
          : `${agent.name} is usually given once; watch for at least ${agent.watchDays} days (common practice, no published source).`}{" "}
        {plan.firstDose && plan.firstDose.fraction < 1
          ? "Give the reduced first dose; go on to the full dose only if the fish came through it well."
          : null}
      </p>
      <div className="flex flex-wrap gap-4 no-print">
        <div className="grid gap-1">
          <label htmlFor={`${id}-start`} className="font-bold">
            First dose on
          </label>
          <input
            id={`${id}-start`}
            type="datetime-local"
            className="rounded-md border border-peat-300 px-3 py-2"
            value={start}
            onChange={(e) => setStart(e.target.value)}
          />
        </div>
        {agent.redoseHours ? (
          <div className="grid gap-1">
            <label htmlFor={`${id}-doses`} className="font-bold">
              Number of doses
            </label>
            <input
              id={`${id}-doses`}
              type="number"
              min={1}
              max={10}
              className="w-24 rounded-md border border-peat-300 px-3 py-2"
              value={doses}
              onChange={(e) => setDoses(e.target.value)}
            />
          </div>
        ) : null}
      </div>
      <ol className="grid gap-1" data-testid="checklist">
        {items.map((item, i) => (
          <li key={i} className="flex items-start gap-2">
            <input type="checkbox" id={`${id}-c${i}`} className="mt-1" />
            <label htmlFor={`${id}-c${i}`}>
              <strong>
                {item.at.toLocaleString("en-GB", {
                  weekday: "short",
                  day: "numeric",
                  month: "short",
                  hour: "2-digit",
                  minute: "2-digit",
                })}
              </strong>{" "}
              — {item.label}
              {item.kind === "dose"
                ? `: ${item.doseGrams !== undefined ? `${fmt(item.doseGrams, 1)} g of dry salt` : `${fmt(item.doseMl!)} mL`}, ${fmtSig(item.concentration!)} ${agent.unit}${item.reduced ? " (first, reduced)" : ""}`
                : ""}
            </label>
          </li>
        ))}
      </ol>
      {warnings.length ? (
        <p className="text-sm font-bold text-alarm-700">
          This plan carries {warnings.length} warning{warnings.length === 1 ? "" : "s"} (above); they are printed and
          written into the calendar file too.
        </p>
      ) : null}
      <div className="flex flex-wrap gap-3 no-print">
        <button
          type="button"
          onClick={() => window.print()}
          className="rounded-md border border-peat-500 px-4 py-2 font-bold"
        >
          Print this plan
        </button>
        {icsHref ? (
          <a
            href={icsHref}
            download="dose-plan.ics"
            className="rounded-md border border-peat-500 px-4 py-2 font-bold no-underline"
          >
            Add to my calendar (.ics)
          </a>
        ) : null}
      </div>
    </section>
  );
}
