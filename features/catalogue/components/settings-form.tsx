"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { zodResolver } from "@hookform/resolvers/zod";
import { useForm, type FieldPath } from "react-hook-form";
import type { z } from "zod";
import { ApiError, fetchJson } from "@/features/shared/fetch-json";
import { clubSettingsSchema } from "../settings-schema";

export interface SettingsValues {
  name: string;
  confidenceLevel: number;
  minReports: number;
  defaultVolumeUnit: string;
  defaultTemperatureUnit: string;
  firstDoseFraction: number;
  nightlyBackup: boolean;
}

type Input = z.input<typeof clubSettingsSchema>;
type Output = z.output<typeof clubSettingsSchema>;

/** The club settings, checked by the API's own schema and saved through PATCH /api/admin/settings. */
export function SettingsForm({ initial }: { initial: SettingsValues }) {
  const router = useRouter();
  const [saved, setSaved] = useState(initial);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<Input, unknown, Output>({
    resolver: zodResolver(clubSettingsSchema),
    mode: "onTouched",
    defaultValues: {
      ...initial,
      // Stored as the schema wrote them; the selects hold text.
      defaultVolumeUnit: initial.defaultVolumeUnit as Input["defaultVolumeUnit"],
      defaultTemperatureUnit: initial.defaultTemperatureUnit as Input["defaultTemperatureUnit"],
      confidenceLevel: String(initial.confidenceLevel),
      minReports: String(initial.minReports),
      firstDoseFraction: initial.firstDoseFraction === 0.5 ? "0.5" : "0.3333333333333333",
    },
  });
  const onSubmit = handleSubmit(
    async (values) => {
      setMessage(null);
      try {
        const { settings } = await fetchJson<{ settings: SettingsValues }>("/api/admin/settings", {
          method: "PATCH",
          body: JSON.stringify(values),
        });
        const recomputing =
          settings.confidenceLevel !== saved.confidenceLevel || settings.minReports !== saved.minReports;
        setSaved(settings);
        setMessage({
          ok: true,
          text: recomputing
            ? "Saved. Every summary is being recomputed with the new settings; the evidence pages show them within a few seconds."
            : "Saved.",
        });
        router.refresh();
      } catch (err) {
        // The server's answer lands on the fields it names; the first of them gets the cursor.
        const issues = err instanceof ApiError ? (err.body.issues ?? []) : [];
        issues.forEach((i, n) =>
          setError(i.path as FieldPath<Input>, { type: "server", message: i.message }, { shouldFocus: n === 0 }),
        );
        setMessage({
          ok: false,
          text: issues.length
            ? "Some settings need fixing; nothing was changed."
            : err instanceof ApiError
              ? err.message
              : "The settings could not be saved; check your connection and try again.",
        });
      }
    },
    () => setMessage({ ok: false, text: "Some settings need fixing; nothing was changed." }),
  );
  const cls = "rounded-md border border-peat-300 bg-white px-3 py-2";
  const err = (k: keyof Input) =>
    errors[k]?.message ? (
      <p id={`${k}-error`} className="text-sm font-bold text-alarm-700">
        {errors[k]?.message}
      </p>
    ) : null;
  const aria = (k: keyof Input, help?: string) => ({
    "aria-invalid": errors[k] ? true : undefined,
    "aria-describedby": [help, errors[k] ? `${k}-error` : null].filter(Boolean).join(" ") || undefined,
  });
  return (
    <form onSubmit={onSubmit} noValidate className="grid max-w-xl gap-4" aria-label="Club settings">
      <div className="grid gap-1">
        <label htmlFor="name" className="font-bold">
          Club name
        </label>
        <input id="name" {...register("name")} className={cls} {...aria("name")} />
        {err("name")}
      </div>
      <div className="grid gap-1">
        <label htmlFor="confidenceLevel" className="font-bold">
          Confidence level of intervals
        </label>
        <select id="confidenceLevel" {...register("confidenceLevel")} className={cls} {...aria("confidenceLevel")}>
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
          {...register("minReports")}
          inputMode="numeric"
          className={cls}
          {...aria("minReports")}
        />
        {err("minReports")}
      </div>
      <div className="grid grid-cols-2 gap-4">
        <div className="grid gap-1">
          <label htmlFor="defaultVolumeUnit" className="font-bold">
            Default volume unit
          </label>
          <select
            id="defaultVolumeUnit"
            {...register("defaultVolumeUnit")}
            className={cls}
            {...aria("defaultVolumeUnit")}
          >
            <option value="L">litres</option>
            <option value="gal_us">US gallons</option>
            <option value="gal_imp">imperial gallons</option>
          </select>
          {err("defaultVolumeUnit")}
        </div>
        <div className="grid gap-1">
          <label htmlFor="defaultTemperatureUnit" className="font-bold">
            Default temperature unit
          </label>
          <select
            id="defaultTemperatureUnit"
            {...register("defaultTemperatureUnit")}
            className={cls}
            {...aria("defaultTemperatureUnit")}
          >
            <option value="C">°C</option>
            <option value="F">°F</option>
          </select>
          {err("defaultTemperatureUnit")}
        </div>
      </div>
      <div className="grid gap-1">
        <label htmlFor="firstDoseFraction" className="font-bold">
          First dose the planner offers from a group&apos;s evidence
        </label>
        <select
          id="firstDoseFraction"
          {...register("firstDoseFraction")}
          className={cls}
          {...aria("firstDoseFraction")}
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
            type="checkbox"
            {...register("nightlyBackup")}
            className="h-4 w-4"
            {...aria("nightlyBackup", "nightlyBackup-help")}
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
      {message ? (
        <p
          role={message.ok ? "status" : "alert"}
          className={message.ok ? "font-bold text-peat-700" : "font-bold text-alarm-700"}
        >
          {message.text}
        </p>
      ) : null}
      <button
        type="submit"
        disabled={isSubmitting}
        className="justify-self-start rounded-md bg-peat-700 px-4 py-2 font-bold text-white"
      >
        {isSubmitting ? "Saving and recomputing…" : "Save settings"}
      </button>
    </form>
  );
}
