"use client";

import { useActionState } from "react";

export interface SettingsState {
  ok: boolean;
  message: string | null;
  fieldErrors: Record<string, string>;
  values: {
    name: string;
    confidenceLevel: number;
    minReports: number;
    defaultVolumeUnit: string;
    defaultTemperatureUnit: string;
    firstDoseFraction: number;
    nightlyBackup: boolean;
  };
}

export function SettingsForm({
  action,
  initial,
}: {
  action: (s: SettingsState, f: FormData) => Promise<SettingsState>;
  initial: SettingsState;
}) {
  const [state, formAction, pending] = useActionState(action, initial);
  const err = (k: string) =>
    state.fieldErrors[k] ? (
      <p id={`${k}-error`} className="text-sm font-bold text-alarm-700">
        {state.fieldErrors[k]}
      </p>
    ) : null;
  const v = state.values;
  const cls = "rounded-md border border-peat-300 bg-white px-3 py-2";
  return (
    <form action={formAction} className="grid max-w-xl gap-4" aria-label="Club settings">
      <div className="grid gap-1">
        <label htmlFor="name" className="font-bold">
          Club name
        </label>
        <input
          id="name"
          name="name"
          defaultValue={v.name}
          className={cls}
          aria-invalid={state.fieldErrors.name ? true : undefined}
          aria-describedby={state.fieldErrors.name ? "name-error" : undefined}
        />
        {err("name")}
      </div>
      <div className="grid gap-1">
        <label htmlFor="confidenceLevel" className="font-bold">
          Confidence level of intervals
        </label>
        <select id="confidenceLevel" name="confidenceLevel" defaultValue={String(v.confidenceLevel)} className={cls}>
          {[80, 90, 95, 99].map((x) => (
            <option key={x} value={x}>
              {x} %
            </option>
          ))}
        </select>
        {err("confidenceLevel")}
      </div>
      <div className="grid gap-1">
        <label htmlFor="minReports" className="font-bold">
          Minimum reports before a summary can be leaned on
        </label>
        <input
          id="minReports"
          name="minReports"
          inputMode="numeric"
          defaultValue={String(v.minReports)}
          className={cls}
          aria-invalid={state.fieldErrors.minReports ? true : undefined}
          aria-describedby={state.fieldErrors.minReports ? "minReports-error" : undefined}
        />
        {err("minReports")}
      </div>
      <div className="grid grid-cols-2 gap-4">
        <div className="grid gap-1">
          <label htmlFor="defaultVolumeUnit" className="font-bold">
            Default volume unit
          </label>
          <select id="defaultVolumeUnit" name="defaultVolumeUnit" defaultValue={v.defaultVolumeUnit} className={cls}>
            <option value="L">litres</option>
            <option value="gal_us">US gallons</option>
            <option value="gal_imp">imperial gallons</option>
          </select>
        </div>
        <div className="grid gap-1">
          <label htmlFor="defaultTemperatureUnit" className="font-bold">
            Default temperature unit
          </label>
          <select
            id="defaultTemperatureUnit"
            name="defaultTemperatureUnit"
            defaultValue={v.defaultTemperatureUnit}
            className={cls}
          >
            <option value="C">°C</option>
            <option value="F">°F</option>
          </select>
        </div>
      </div>
      <div className="grid gap-1">
        <label htmlFor="firstDoseFraction" className="font-bold">
          First dose the planner offers from a group&apos;s evidence
        </label>
        <select
          id="firstDoseFraction"
          name="firstDoseFraction"
          defaultValue={v.firstDoseFraction === 0.5 ? "0.5" : "0.3333333333333333"}
          className={cls}
        >
          <option value="0.5">½ of the usual (median tolerated) dose</option>
          <option value="0.3333333333333333">⅓ of the usual dose (more cautious)</option>
        </select>
        {err("firstDoseFraction")}
      </div>
      <div className="grid gap-1">
        <div className="flex items-center gap-2">
          <input
            id="nightlyBackup"
            name="nightlyBackup"
            type="checkbox"
            defaultChecked={v.nightlyBackup}
            className="h-4 w-4"
            aria-describedby="nightlyBackup-help"
          />
          <label htmlFor="nightlyBackup" className="font-bold">
            Take a backup every night
          </label>
        </div>
        <p id="nightlyBackup-help" className="text-sm text-peat-700">
          Around 03:00 server time, into the backups folder of the data directory; the last 7 are kept. Each archive
          holds every account and the session secret: keep copies somewhere private.
        </p>
        {err("nightlyBackup")}
      </div>
      {state.message ? (
        <p
          role={state.ok ? "status" : "alert"}
          className={state.ok ? "font-bold text-peat-700" : "font-bold text-alarm-700"}
        >
          {state.message}
        </p>
      ) : null}
      <button
        type="submit"
        disabled={pending}
        className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white"
      >
        {pending ? "Saving and recomputing…" : "Save settings"}
      </button>
    </form>
  );
}
