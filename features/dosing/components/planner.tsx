"use client";

import { useSearchParams } from "next/navigation";
import { useEffect, useId, useMemo, useState } from "react";
import { planDose, redoseChecklist, type Plan, type VolumeInput } from "../plan";
import { DosingInputError } from "../concentration";
import { volumeUnitLabels, volumeUnits, type LengthUnit, type VolumeUnit } from "../units";
import type { StockBasis } from "../concentration";

export interface PlannerStock {
  id: string;
  label: string;
  percent: number;
  basis: StockBasis;
  densityGPerMl: number | null;
  activeFraction: number;
}

export interface PlannerAgent {
  slug: string;
  name: string;
  unit: "mg/L" | "g/L";
  redoseHours: number | null;
  watchDays: number;
  description: string;
  stockForms: PlannerStock[];
}

const UNITS_KEY = "tanklore.planner.units";
const fmt = (n: number, digits = 2) => n.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: 0 });
const fmtSig = (n: number) => (Math.abs(n) >= 100 ? fmt(n, 0) : Math.abs(n) >= 10 ? fmt(n, 1) : fmt(n, 2));

function parseNum(s: string): number | undefined {
  if (s.trim() === "") return undefined;
  const n = Number(s.replace(",", "."));
  return Number.isFinite(n) ? n : NaN;
}

type Errors = Partial<Record<string, string>>;

const fractions = [
  { value: "1", label: "Full dose" },
  { value: "0.5", label: "Half (½) — a cautious first dose" },
  { value: "0.3333333333333333", label: "Third (⅓) — for sensitive fish" },
  { value: "custom", label: "Another fraction…" },
];

export function Planner({ agents }: { agents: PlannerAgent[] }) {
  const params = useSearchParams();
  const id = useId();
  const initialAgent = agents.find((a) => a.slug === params.get("agent")) ?? agents[0]!;
  const [agentSlug, setAgentSlug] = useState(initialAgent.slug);
  const agent = agents.find((a) => a.slug === agentSlug) ?? agents[0]!;
  const [stockId, setStockId] = useState(initialAgent.stockForms[0]?.id ?? "custom");
  const [customPercent, setCustomPercent] = useState("3");
  const [customBasis, setCustomBasis] = useState<StockBasis>("w/v");
  const [customDensity, setCustomDensity] = useState("");
  const [volumeMode, setVolumeMode] = useState<"volume" | "dimensions">("volume");
  const [volume, setVolume] = useState("");
  const [volumeUnit, setVolumeUnit] = useState<VolumeUnit>("L");
  const [dims, setDims] = useState({ length: "", width: "", depth: "", displacement: "0" });
  const [lengthUnit, setLengthUnit] = useState<LengthUnit>("cm");
  const [mode, setMode] = useState<"target" | "added">("target");
  const [target, setTarget] = useState(params.get("target") ?? "");
  const [added, setAdded] = useState("");
  const initialFraction = params.get("fraction");
  const [fractionChoice, setFractionChoice] = useState(
    initialFraction ? (fractions.some((f) => f.value !== "custom" && Math.abs(Number(f.value) - Number(initialFraction)) < 1e-6) ? fractions.find((f) => Math.abs(Number(f.value) - Number(initialFraction)) < 1e-6)!.value : "custom") : "0.5",
  );
  const [customFraction, setCustomFraction] = useState(initialFraction ?? "0.5");
  const [doses, setDoses] = useState("3");
  const [start, setStart] = useState("");
  const groupName = params.get("groupName");

  // Units follow the visitor's last choice on this device.
  useEffect(() => {
    try {
      const saved = JSON.parse(localStorage.getItem(UNITS_KEY) ?? "{}");
      if (volumeUnits.includes(saved.volumeUnit)) setVolumeUnit(saved.volumeUnit);
      if (saved.lengthUnit === "cm" || saved.lengthUnit === "in") setLengthUnit(saved.lengthUnit);
      if (saved.volumeMode === "volume" || saved.volumeMode === "dimensions") setVolumeMode(saved.volumeMode);
    } catch {
      // Nothing saved, or storage is off: keep the defaults.
    }
    const now = new Date();
    now.setMinutes(0, 0, 0);
    setStart(new Date(now.getTime() - now.getTimezoneOffset() * 60000).toISOString().slice(0, 16));
  }, []);
  useEffect(() => {
    try {
      localStorage.setItem(UNITS_KEY, JSON.stringify({ volumeUnit, lengthUnit, volumeMode }));
    } catch {
      // Storage off: units are simply not remembered.
    }
  }, [volumeUnit, lengthUnit, volumeMode]);

  const stock = agent.stockForms.find((s) => s.id === stockId);
  const { plan, errors } = useMemo(() => {
    const errors: Errors = {};
    const need = (field: string, raw: string, label: string) => {
      const n = parseNum(raw);
      if (n === undefined) errors[field] = `Enter the ${label}.`;
      else if (Number.isNaN(n)) errors[field] = `The ${label} must be a number.`;
      return n;
    };
    const percent = stock ? stock.percent : need("stockPercent", customPercent, "stock strength in %");
    const density = stock ? stock.densityGPerMl : parseNum(customDensity);
    if (!stock && customBasis === "w/w" && density === undefined) errors.densityGPerMl = "A % w/w strength needs the solution's density in g/mL.";
    let water: VolumeInput | null = null;
    if (volumeMode === "volume") {
      const v = need("volume", volume, "water volume");
      if (v !== undefined && !Number.isNaN(v)) water = { kind: "volume", volume: v, unit: volumeUnit };
    } else {
      const l = need("length", dims.length, "length");
      const w = need("width", dims.width, "width");
      const d = need("depth", dims.depth, "water depth");
      const disp = parseNum(dims.displacement) ?? 0;
      if ([l, w, d].every((x) => x !== undefined && !Number.isNaN(x))) water = { kind: "dimensions", length: l!, width: w!, depth: d!, unit: lengthUnit, displacementPercent: disp };
    }
    const t = mode === "target" ? need("target", target, "target concentration") : undefined;
    const a = mode === "added" ? need("addedMl", added, "millilitres added") : undefined;
    const f = fractionChoice === "custom" ? need("fraction", customFraction, "fraction") : Number(fractionChoice);
    if (Object.keys(errors).length || !water || percent === undefined) return { plan: null, errors };
    try {
      const plan = planDose({
        agentSlug: agent.slug,
        unit: agent.unit,
        stock: { percent: percent!, basis: stock ? stock.basis : customBasis, densityGPerMl: density ?? null, activeFraction: stock?.activeFraction ?? 1 },
        water,
        target: t,
        addedMl: a,
        fraction: f,
      });
      return { plan, errors };
    } catch (failure) {
      if (failure instanceof DosingInputError) {
        errors[failure.field === "activeFraction" ? "stockPercent" : failure.field] = failure.message;
        return { plan: null, errors };
      }
      throw failure;
    }
  }, [agent, stock, customPercent, customBasis, customDensity, volumeMode, volume, volumeUnit, dims, lengthUnit, mode, target, added, fractionChoice, customFraction]);

  const field = (name: string) => ({
    id: `${id}-${name}`,
    "aria-invalid": errors[name] ? true : undefined,
    "aria-describedby": errors[name] ? `${id}-${name}-error` : undefined,
  });
  const err = (name: string) =>
    errors[name] ? (
      <p id={`${id}-${name}-error`} className="text-sm font-bold text-alarm-700">
        {errors[name]}
      </p>
    ) : null;
  const input = "rounded-md border border-peat-300 bg-white px-3 py-2 aria-[invalid=true]:border-alarm-500";

  return (
    <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <form className="grid content-start gap-6 no-print" onSubmit={(e) => e.preventDefault()} aria-label="Dose planner">
        {groupName ? (
          <p className="rounded-md bg-peat-50 p-3 text-sm">
            Prefilled from the club&apos;s evidence for <strong>{groupName}</strong>. Check every figure against your own tank.
          </p>
        ) : null}
        <fieldset className="grid gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">1. Treatment and stock bottle</legend>
          <label htmlFor={`${id}-agent`} className="font-bold">Treatment</label>
          <select
            id={`${id}-agent`}
            className={input}
            value={agentSlug}
            onChange={(e) => {
              const next = agents.find((a) => a.slug === e.target.value)!;
              setAgentSlug(next.slug);
              setStockId(next.stockForms[0]?.id ?? "custom");
            }}
          >
            {agents.map((a) => (
              <option key={a.slug} value={a.slug}>{a.name}</option>
            ))}
          </select>
          <p className="text-sm text-peat-700">{agent.description}</p>
          <label htmlFor={`${id}-stock`} className="font-bold">Stock strength</label>
          <select id={`${id}-stock`} className={input} value={stockId} onChange={(e) => setStockId(e.target.value)}>
            {agent.stockForms.map((s) => (
              <option key={s.id} value={s.id}>{s.label}</option>
            ))}
            <option value="custom">Another strength…</option>
          </select>
          {!stock ? (
            <div className="grid grid-cols-3 gap-3">
              <div className="grid gap-1">
                <label htmlFor={`${id}-stockPercent`} className="font-bold">Strength (%)</label>
                <input {...field("stockPercent")} inputMode="decimal" className={input} value={customPercent} onChange={(e) => setCustomPercent(e.target.value)} />
              </div>
              <div className="grid gap-1">
                <label htmlFor={`${id}-basis`} className="font-bold">Basis</label>
                <select id={`${id}-basis`} className={input} value={customBasis} onChange={(e) => setCustomBasis(e.target.value as StockBasis)}>
                  <option value="w/v">w/v (g per 100 mL)</option>
                  <option value="w/w">w/w (g per 100 g)</option>
                </select>
              </div>
              <div className="grid gap-1">
                <label htmlFor={`${id}-densityGPerMl`} className="font-bold">Density (g/mL)</label>
                <input {...field("densityGPerMl")} inputMode="decimal" className={input} value={customDensity} disabled={customBasis === "w/v"} onChange={(e) => setCustomDensity(e.target.value)} />
              </div>
              <div className="col-span-3">{err("stockPercent")}{err("densityGPerMl")}</div>
            </div>
          ) : null}
        </fieldset>

        <fieldset className="grid gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">2. Water to treat</legend>
          <div className="flex gap-4" role="radiogroup" aria-label="How to give the water volume">
            <label className="flex items-center gap-2"><input type="radio" name="volumeMode" checked={volumeMode === "volume"} onChange={() => setVolumeMode("volume")} /> I know the volume</label>
            <label className="flex items-center gap-2"><input type="radio" name="volumeMode" checked={volumeMode === "dimensions"} onChange={() => setVolumeMode("dimensions")} /> Work it out from the tank</label>
          </div>
          {volumeMode === "volume" ? (
            <div className="grid grid-cols-2 gap-3">
              <div className="grid gap-1">
                <label htmlFor={`${id}-volume`} className="font-bold">Water volume</label>
                <input {...field("volume")} inputMode="decimal" className={input} value={volume} onChange={(e) => setVolume(e.target.value)} />
              </div>
              <div className="grid gap-1">
                <label htmlFor={`${id}-volumeUnit`} className="font-bold">Unit</label>
                <select id={`${id}-volumeUnit`} className={input} value={volumeUnit} onChange={(e) => setVolumeUnit(e.target.value as VolumeUnit)}>
                  {volumeUnits.map((u) => (
                    <option key={u} value={u}>{volumeUnitLabels[u]}</option>
                  ))}
                </select>
              </div>
              <div className="col-span-2">{err("volume")}</div>
            </div>
          ) : (
            <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
              {(["length", "width", "depth"] as const).map((d) => (
                <div key={d} className="grid gap-1">
                  <label htmlFor={`${id}-${d}`} className="font-bold">{d === "depth" ? "Water depth" : d === "length" ? "Length" : "Width"}</label>
                  <input {...field(d)} inputMode="decimal" className={input} value={dims[d]} onChange={(e) => setDims({ ...dims, [d]: e.target.value })} />
                </div>
              ))}
              <div className="grid gap-1">
                <label htmlFor={`${id}-lengthUnit`} className="font-bold">Unit</label>
                <select id={`${id}-lengthUnit`} className={input} value={lengthUnit} onChange={(e) => setLengthUnit(e.target.value as LengthUnit)}>
                  <option value="cm">cm</option>
                  <option value="in">inches</option>
                </select>
              </div>
              <div className="col-span-2 grid gap-1">
                <label htmlFor={`${id}-displacementPercent`} className="font-bold">Less for gravel and decor (%)</label>
                <input {...field("displacementPercent")} inputMode="decimal" className={input} value={dims.displacement} onChange={(e) => setDims({ ...dims, displacement: e.target.value })} />
              </div>
              <div className="col-span-full">{err("length")}{err("width")}{err("depth")}{err("displacementPercent")}</div>
              <p className="col-span-full text-sm text-peat-700">Measure inside the glass; depth is of the water, not the tank.</p>
            </div>
          )}
        </fieldset>

        <fieldset className="grid gap-3">
          <legend className="mb-1 text-lg font-bold text-peat-900">3. Dose</legend>
          <div className="flex flex-wrap gap-4" role="radiogroup" aria-label="What to work out">
            <label className="flex items-center gap-2"><input type="radio" name="mode" checked={mode === "target"} onChange={() => setMode("target")} /> How much do I add?</label>
            <label className="flex items-center gap-2"><input type="radio" name="mode" checked={mode === "added"} onChange={() => setMode("added")} /> What did my mL make?</label>
          </div>
          {mode === "target" ? (
            <div className="grid gap-1">
              <label htmlFor={`${id}-target`} className="font-bold">Target concentration ({agent.unit})</label>
              <input {...field("target")} inputMode="decimal" className={input} value={target} onChange={(e) => setTarget(e.target.value)} />
              {err("target")}
            </div>
          ) : (
            <div className="grid gap-1">
              <label htmlFor={`${id}-addedMl`} className="font-bold">Millilitres of stock added</label>
              <input {...field("addedMl")} inputMode="decimal" className={input} value={added} onChange={(e) => setAdded(e.target.value)} />
              {err("addedMl")}
            </div>
          )}
          <label htmlFor={`${id}-fractionChoice`} className="font-bold">First dose</label>
          <select id={`${id}-fractionChoice`} className={input} value={fractionChoice} onChange={(e) => setFractionChoice(e.target.value)}>
            {fractions.map((f) => (
              <option key={f.value} value={f.value}>{f.label}</option>
            ))}
          </select>
          {fractionChoice === "custom" ? (
            <div className="grid gap-1">
              <label htmlFor={`${id}-fraction`} className="font-bold">Fraction of the full dose (0 to 1)</label>
              <input {...field("fraction")} inputMode="decimal" className={input} value={customFraction} onChange={(e) => setCustomFraction(e.target.value)} />
              {err("fraction")}
            </div>
          ) : null}
        </fieldset>
      </form>

      <section aria-labelledby={`${id}-result`} className="grid content-start gap-4">
        <h2 id={`${id}-result`} className="text-2xl font-bold text-peat-900">Your dose</h2>
        <div aria-live="polite" data-testid="planner-result">
          {plan ? <Result plan={plan} agent={agent} /> : <p className="text-peat-700">Fill in the steps on the left; the result appears here as you type.</p>}
        </div>
        {plan ? <Checklist plan={plan} agent={agent} doses={doses} setDoses={setDoses} start={start} setStart={setStart} /> : null}
        {plan && volumeMode === "volume" ? (
          <a
            className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold no-underline no-print"
            href={`/reports/new?${new URLSearchParams({
              course: "1", agentSlug: agent.slug, stockPercent: String(stock ? stock.percent : customPercent), stockBasis: stock ? stock.basis : customBasis,
              volume, volumeUnit, amountMl: String((plan.firstDose ?? plan).measured.ml || ""), ...(agent.redoseHours ? { intervalHours: String(agent.redoseHours) } : {}),
            })}`}
          >
            Start a course log with this dose
          </a>
        ) : null}
      </section>
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
          <p className="text-sm font-bold uppercase tracking-wide text-peat-700">First dose ({fmt(plan.firstDose.fraction * 100, 0)} % of the full dose)</p>
          <p className="mt-1 text-3xl font-bold" data-testid="first-dose-ml">
            {plan.firstDose.measured.ml > 0 ? `${fmt(plan.firstDose.measured.ml)} mL` : "too little to measure"}
          </p>
          <p className="text-sm">
            exactly {fmtSig(plan.firstDose.doseMl)} mL, giving {fmtSig(plan.firstDose.concentration)} {u}; measure with a {plan.firstDose.measured.tool}
          </p>
        </div>
      ) : null}
      <div className="rounded-lg border border-peat-300 bg-white p-4">
        <p className="text-sm font-bold uppercase tracking-wide text-peat-700">{plan.target !== null ? "Full dose to add" : "What you added makes"}</p>
        {plan.target !== null ? (
          <>
            <p className="mt-1 text-3xl font-bold" data-testid="dose-ml">{full.ml > 0 ? `${fmt(full.ml)} mL` : "too little to measure"}</p>
            <p className="text-sm">exactly {fmtSig(plan.doseMl)} mL for {fmtSig(plan.concentration)} {u}; measure with a {full.tool}, rounded down to its marks</p>
          </>
        ) : (
          <p className="mt-1 text-3xl font-bold" data-testid="concentration">{fmtSig(plan.concentration)} {u}</p>
        )}
        <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-4 text-sm">
          <dt className="font-bold">Water</dt><dd data-testid="volume-l">{fmtSig(plan.volumeL)} L</dd>
          <dt className="font-bold">Stock</dt><dd>{fmtSig(plan.stockMgPerMl)} mg of active per mL</dd>
        </dl>
      </div>
      {full.ml === 0 ? (
        <p role="alert" className="rounded-md bg-alarm-100 p-3 font-bold text-alarm-700">
          This dose is below the smallest mark of a 1 mL syringe. Dilute the stock first (for example 1 part stock to 9 parts water, then use ten times the millilitres).
        </p>
      ) : null}
      {plan.strengthRange ? (
        <p className="rounded-md bg-reed-100 p-3 text-sm">
          A bottle labelled {fmt(plan.strengthRange.lowPercent + (plan.strengthRange.highPercent - plan.strengthRange.lowPercent) / 2, 1)} % may hold between {fmt(plan.strengthRange.lowPercent, 1)} % and {fmt(plan.strengthRange.highPercent, 1)} % ({plan.strengthRange.source}), so this dose really gives
          between <strong>{fmtSig(plan.strengthRange.concentrationLow)}</strong> and <strong>{fmtSig(plan.strengthRange.concentrationHigh)} {u}</strong>. Old or opened bottles lose strength.
        </p>
      ) : null}
    </div>
  );
}

function Checklist({ plan, agent, doses, setDoses, start, setStart }: { plan: Plan; agent: PlannerAgent; doses: string; setDoses: (s: string) => void; start: string; setStart: (s: string) => void }) {
  const id = useId();
  const n = Math.min(10, Math.max(1, Math.floor(Number(doses) || 1)));
  const startDate = start ? new Date(start) : null;
  const items = startDate && !Number.isNaN(startDate.getTime()) ? redoseChecklist(startDate, n, agent.redoseHours, agent.watchDays) : [];
  return (
    <section className="grid gap-3 rounded-lg border border-peat-100 bg-white p-4" aria-labelledby={`${id}-plan`}>
      <h3 id={`${id}-plan`} className="text-xl font-bold text-peat-900">Dosing and watching plan</h3>
      <p className="text-sm">
        {agent.redoseHours
          ? `Common practice for ${agent.name.toLowerCase()}: a dose every ${agent.redoseHours} hours, then at least ${agent.watchDays} days of watching after the last one (common practice, no published source).`
          : `${agent.name} is usually given once; watch for at least ${agent.watchDays} days (common practice, no published source).`}{" "}
        {plan.firstDose && plan.firstDose.fraction < 1 ? "Give the reduced first dose; go on to the full dose only if the fish came through it well." : null}
      </p>
      <div className="flex flex-wrap gap-4 no-print">
        <div className="grid gap-1">
          <label htmlFor={`${id}-start`} className="font-bold">First dose on</label>
          <input id={`${id}-start`} type="datetime-local" className="rounded-md border border-peat-300 px-3 py-2" value={start} onChange={(e) => setStart(e.target.value)} />
        </div>
        {agent.redoseHours ? (
          <div className="grid gap-1">
            <label htmlFor={`${id}-doses`} className="font-bold">Number of doses</label>
            <input id={`${id}-doses`} type="number" min={1} max={10} className="w-24 rounded-md border border-peat-300 px-3 py-2" value={doses} onChange={(e) => setDoses(e.target.value)} />
          </div>
        ) : null}
      </div>
      <ol className="grid gap-1" data-testid="checklist">
        {items.map((item, i) => (
          <li key={i} className="flex items-start gap-2">
            <input type="checkbox" id={`${id}-c${i}`} className="mt-1" />
            <label htmlFor={`${id}-c${i}`}>
              <strong>{item.at.toLocaleString("en-GB", { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" })}</strong> — {item.label}
              {item.kind === "dose" ? `: ${i === 0 && plan.firstDose && plan.firstDose.fraction < 1 ? `${fmt(plan.firstDose.measured.ml)} mL (first, reduced)` : `${fmt(plan.measured.ml)} mL`}` : ""}
            </label>
          </li>
        ))}
      </ol>
      <button type="button" onClick={() => window.print()} className="justify-self-start rounded-md border border-peat-500 px-4 py-2 font-bold no-print">
        Print this plan
      </button>
    </section>
  );
}
