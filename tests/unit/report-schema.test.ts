import { describe, expect, it } from "vitest";
import { courseEntrySchema, reportDraftSchema, reportInputSchema } from "@/features/reports";
import { reportBody } from "../support/factories";

const paths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
  r.success ? [] : r.error!.issues.map((i) => i.path.map(String).join("."));

describe("the report schema shared by form and API", () => {
  it("accepts a complete report", () => {
    expect(reportInputSchema.safeParse(reportBody()).success).toBe(true);
  });

  it("refuses more fish lost than treated", () => {
    expect(
      paths(reportInputSchema.safeParse(reportBody({ fishCount: 2, outcome: { fishLost: 3, lossCause: "disease" } }))),
    ).toEqual(["outcome.fishLost"]);
  });

  it("needs the likely cause when fish were lost, and none when none were", () => {
    expect(paths(reportInputSchema.safeParse(reportBody({ outcome: { fishLost: 1, lossCause: null } })))).toEqual([
      "outcome.lossCause",
    ]);
    expect(
      paths(reportInputSchema.safeParse(reportBody({ outcome: { fishLost: 0, lossCause: "treatment" } }))),
    ).toEqual(["outcome.lossCause"]);
  });

  it("needs an amount or a stated concentration, and a stock strength with an amount", () => {
    const none = reportBody();
    delete none.treatment.amountMl;
    expect(paths(reportInputSchema.safeParse(none))).toEqual(["treatment.amountMl"]);
    const noStock = reportBody();
    delete noStock.treatment.stockPercent;
    expect(paths(reportInputSchema.safeParse(noStock))).toEqual(["treatment.stockPercent"]);
  });

  it("needs the interval when more than one dose was given", () => {
    const r = reportBody({ treatment: { doses: 3 } });
    delete r.treatment.intervalHours;
    expect(paths(reportInputSchema.safeParse(r))).toEqual(["treatment.intervalHours"]);
    const one = reportBody({ treatment: { doses: 1 } });
    delete one.treatment.intervalHours;
    expect(reportInputSchema.safeParse(one).success).toBe(true);
  });

  it("refuses a future start date, an impossible date and unknown fields", () => {
    expect(paths(reportInputSchema.safeParse(reportBody({ startedOn: "2999-05-01" })))).toEqual(["startedOn"]);
    expect(paths(reportInputSchema.safeParse(reportBody({ startedOn: "2026-02-30" })))).toEqual(["startedOn"]);
    expect(paths(reportInputSchema.safeParse({ ...reportBody(), owner: "me" }))).toEqual([""]);
  });

  it("needs a name for a species that is not listed", () => {
    expect(paths(reportInputSchema.safeParse(reportBody({ speciesId: null })))).toEqual(["speciesOther"]);
    expect(
      reportInputSchema.safeParse(reportBody({ speciesId: null, speciesOther: "Hyphessobrycon sp. 'red'" })).success,
    ).toBe(true);
  });

  it("checks temperature in either unit and pH bounds", () => {
    expect(
      paths(reportInputSchema.safeParse(reportBody({ water: { temperature: 120, temperatureUnit: "F" } }))),
    ).toEqual(["water.temperature"]);
    expect(reportInputSchema.safeParse(reportBody({ water: { temperature: 78, temperatureUnit: "F" } })).success).toBe(
      true,
    );
    expect(paths(reportInputSchema.safeParse(reportBody({ water: { ph: 15 } })))).toEqual(["water.ph"]);
  });

  it("lets a draft hold any subset, but not a contradiction", () => {
    expect(reportDraftSchema.safeParse({ fishCount: 2 }).success).toBe(true);
    expect(reportDraftSchema.safeParse({ water: { volume: 20 } }).success).toBe(true);
    expect(paths(reportDraftSchema.safeParse({ fishCount: 2, outcome: { fishLost: 4 } }))).toEqual([
      "outcome.fishLost",
    ]);
  });

  it("checks course entries", () => {
    expect(paths(courseEntrySchema.safeParse({ kind: "dose", at: new Date().toISOString() }))).toEqual(["amountMl"]);
    expect(paths(courseEntrySchema.safeParse({ kind: "observation", at: "yesterday", text: "x" }))).toEqual(["at"]);
    expect(
      courseEntrySchema.safeParse({ kind: "observation", at: new Date().toISOString(), text: "Calm." }).success,
    ).toBe(true);
  });
});
