import { describe, expect, it } from "vitest";
import type { ResolverOptions } from "react-hook-form";
import {
  conditionOutcomes,
  distressLevels,
  lossCauses,
  reportDraftSchema,
  reportInputSchema,
  settings,
  sizeClasses,
} from "@/features/reports";
import {
  stepBody,
  stepOfPath,
  stepPatch,
  wizardResolver,
  type WizardValues,
} from "@/features/reports/components/report-wizard-values";
import { forgotPasswordSchema, resetPasswordSchema, signInSchema, signUpSchema } from "@/features/members";
import { zodResolver } from "@hookform/resolvers/zod";

/** A complete, valid report as typed into the form (the same report as tests/support/factories reportBody). */
function typedReport(): WizardValues {
  return {
    speciesId: "paracheirodon-innesi",
    speciesOther: "",
    fishCount: "6",
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-11-02",
    water: { volume: "40", volumeUnit: "L", temperature: "25", temperatureUnit: "C", ph: "7", setting: "bare" },
    treatment: {
      agentSlug: "hydrogen-peroxide",
      stockFormId: "",
      stockPercent: "3",
      stockBasis: "w/v",
      stockDensityGPerMl: "",
      amountMl: "40",
      statedConcentration: "",
      doses: "3",
      intervalHours: "48",
      otherTreatments: "",
    },
    outcome: {
      fishLost: "0",
      lossCause: "",
      distress: "mild",
      condition: "cleared",
      observedDaysAfter: "7",
      notes: "Test report.",
    },
    showName: "no",
  };
}

const options = {
  fields: {},
  shouldUseNativeValidation: false,
  criteriaMode: "firstError",
} as unknown as ResolverOptions<WizardValues>;

/** The resolver's messages for one step, by field path ("water.ph"). */
async function formMessages(step: number, values: WizardValues): Promise<Record<string, string>> {
  const { errors } = await wizardResolver(values, step, options);
  const out: Record<string, string> = {};
  const walk = (node: unknown, path: string[]) => {
    if (!node || typeof node !== "object") return;
    const n = node as { message?: unknown; type?: unknown };
    if (typeof n.message === "string" && typeof n.type === "string") out[path.join(".")] = n.message;
    else for (const [k, v] of Object.entries(node)) if (k !== "ref") walk(v, [...path, k]);
  };
  walk(errors, []);
  return out;
}

/** What the API's PATCH /api/reports/:id schema says about the same step's body. */
function apiMessages(step: number, values: WizardValues): Record<string, string> {
  const r = reportDraftSchema.safeParse(stepPatch(step, values));
  return r.success ? {} : Object.fromEntries(r.error.issues.map((i) => [i.path.map(String).join("."), i.message]));
}

const edit = (change: (v: WizardValues) => void): WizardValues => {
  const v = typedReport();
  change(v);
  return v;
};

describe("the report form checks each step with the server's own rules", () => {
  it("passes a complete report on every step, and the steps together make a report the API accepts", async () => {
    for (const step of [0, 1, 2, 3]) expect(await formMessages(step, typedReport())).toEqual({});
    const whole = Object.assign({}, ...[0, 1, 2, 3].map((s) => stepPatch(s, typedReport())));
    expect(reportInputSchema.safeParse(whole).success).toBe(true);
  });

  // Each value the API's draft schema refuses; the form must flag the same field with the same sentence.
  const refused: [string, number, (v: WizardValues) => void, string][] = [
    ["no fish", 0, (v) => (v.fishCount = "0"), "fishCount"],
    ["a fraction of a fish", 0, (v) => (v.fishCount = "2.5"), "fishCount"],
    ["a start date in the future", 0, (v) => (v.startedOn = "2999-01-01"), "startedOn"],
    ["a date not on the calendar", 0, (v) => (v.startedOn = "2026-02-30"), "startedOn"],
    ["a species not listed and not named", 0, (v) => (v.speciesId = "__other"), "speciesOther"],
    ["a pH of 15", 1, (v) => (v.water.ph = "15"), "water.ph"],
    ["a volume of words", 1, (v) => (v.water.volume = "lots"), "water.volume"],
    ["water at 60 °C", 1, (v) => (v.water.temperature = "60"), "water.temperature"],
    ["a stock stronger than 100 %", 2, (v) => (v.treatment.stockPercent = "150"), "treatment.stockPercent"],
    ["no doses", 2, (v) => (v.treatment.doses = "0"), "treatment.doses"],
    ["a density of 9 g/mL", 2, (v) => (v.treatment.stockDensityGPerMl = "9"), "treatment.stockDensityGPerMl"],
    ["a year of watching", 3, (v) => (v.outcome.observedDaysAfter = "400"), "outcome.observedDaysAfter"],
    ["negative losses", 3, (v) => (v.outcome.fishLost = "-1"), "outcome.fishLost"],
  ];
  it.each(refused)("flags %s with the API's message", async (_what, step, change, path) => {
    const values = edit(change);
    const api = apiMessages(step, values);
    expect(api[path], `the API refuses ${path}`).toBeTruthy();
    expect((await formMessages(step, values))[path]).toBe(api[path]);
  });

  const lacking: [number, (v: WizardValues) => void, string][] = [
    [0, (v) => (v.sizeClass = ""), "sizeClass"],
    [0, (v) => (v.fishCount = ""), "fishCount"],
    [1, (v) => (v.water.setting = ""), "water.setting"],
    [2, (v) => (v.treatment.intervalHours = ""), "treatment.intervalHours"],
    [2, (v) => ((v.treatment.amountMl = ""), (v.treatment.statedConcentration = "")), "treatment.amountMl"],
    [3, (v) => (v.outcome.distress = ""), "outcome.distress"],
  ];
  it.each(lacking)("asks on step %i for what is missing, as submit does (%#)", async (step, change, path) => {
    const values = edit(change);
    const submit = reportInputSchema.safeParse(Object.assign({}, ...[0, 1, 2, 3].map((s) => stepPatch(s, values))));
    const said = (submit.success ? [] : submit.error.issues).find((i) => i.path.map(String).join(".") === path);
    expect(said?.message, `submit refuses ${path}`).toBeTruthy();
    expect((await formMessages(step, values))[path]).toBe(said?.message);
  });

  it("compares fish lost with fish treated from the first step", async () => {
    const v = edit((x) => {
      x.fishCount = "2";
      x.outcome.fishLost = "3";
      x.outcome.lossCause = "disease";
    });
    expect((await formMessages(3, v))["outcome.fishLost"]).toBe("Fish lost cannot be more than fish treated.");
  });

  it("says every problem in plain words: no field names, codes or lists of allowed values", async () => {
    const empty = edit((v) => {
      for (const k of ["speciesId", "fishCount", "sizeClass", "conditionSlug", "startedOn"] as const) v[k] = "";
      for (const k of Object.keys(v.water) as (keyof WizardValues["water"])[]) v.water[k] = "";
      for (const k of Object.keys(v.treatment) as (keyof WizardValues["treatment"])[]) v.treatment[k] = "x";
      for (const k of Object.keys(v.outcome) as (keyof WizardValues["outcome"])[]) v.outcome[k] = "";
    });
    const codes: readonly string[] = [
      ...sizeClasses,
      ...settings,
      ...lossCauses,
      ...distressLevels,
      ...conditionOutcomes,
    ];
    const messages = (await Promise.all([0, 1, 2, 3].map((s) => formMessages(s, empty)))).flatMap(Object.values);
    expect(messages.length).toBeGreaterThan(12);
    for (const m of messages) {
      expect(m, m).not.toMatch(/\b[a-z]+[A-Z]\w*\b|\b\w+_\w+\b|must be one of|Invalid input|expected/);
      // One value named in passing may be a plain word ("bare"); a list of allowed values is not.
      expect(codes.filter((c) => new RegExp(`\\b${c}\\b`).test(m)).length, m).toBeLessThan(2);
    }
  });

  it("files each field of the API under the step that asks for it", () => {
    expect(Object.keys(stepBody(0, typedReport())).map(stepOfPath)).toEqual([0, 0, 0, 0, 0, 0]);
    expect(["water.ph", "treatment.doses", "outcome.notes", "showName", "photos"].map(stepOfPath)).toEqual([
      1, 2, 3, 3, 4,
    ]);
  });
});

describe("the sign-in forms use the shared schemas", () => {
  const resolve = async <T extends object>(schema: Parameters<typeof zodResolver>[0], values: T) =>
    // The resolver the forms use, over the schema the forms import.
    (await zodResolver(schema)(values as never, undefined, options as never)).errors as Record<
      string,
      { message: string }
    >;

  it("asks for an address and a password, in words", async () => {
    const e = await resolve(signInSchema, { email: "", password: "" });
    expect(e.email?.message).toBe("Give your e-mail address.");
    expect(e.password?.message).toBe("Give your password.");
    expect((await resolve(signInSchema, { email: "someone@", password: "x" })).email?.message).toMatch(/not an e-mail/);
  });

  it("holds a new password to the length better-auth is configured with, and both copies to match", async () => {
    const short = await resolve(signUpSchema, {
      name: "Wren",
      email: "wren@example.org",
      password: "short",
      confirm: "short",
    });
    expect(short.password?.message).toBe("Choose a password of at least 10 characters.");
    const differ = await resolve(resetPasswordSchema, { password: "long enough pass", confirm: "long enough pasS" });
    expect(differ.confirm?.message).toBe("The two passwords differ. Type the same password twice.");
    expect(await resolve(forgotPasswordSchema, { email: "wren@example.org" })).toEqual({});
  });
});
