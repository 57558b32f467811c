import { beforeAll, describe, expect, it } from "vitest";
import ICAL from "ical.js";
import * as doseRoute from "@/app/api/dose/route";
import * as icsRoute from "@/app/api/dose/plan.ics/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { call } from "../support/http";

const qs = (q: Record<string, string | number>) =>
  new URLSearchParams(Object.entries(q).map(([k, v]) => [k, String(v)]));
const get = (q: Record<string, string | number>) => call(doseRoute.GET, `/api/dose?${qs(q)}`);

beforeAll(async () => {
  await seedCatalogue(await getDb());
}, 60_000);

const dry = { agent: "salt", form: "dry", volume: 40, volumeUnit: "L" };

describe("GET /api/dose with form=dry: salt in grams", () => {
  it("answers 120 g of dry salt for 3 g/L in 40 L, with no mL and no stock", async () => {
    // 3 g/L × 40 L = 120 g (mass concentration = mass ÷ volume, SI Brochure 9th ed.).
    const r = await get({ ...dry, target: 3, fraction: 0.5 });
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({
      agent: "salt",
      unit: "g/L",
      form: "dry",
      concentration: 3,
      doseMl: null,
      stock: null,
      measured: null,
      warnings: [],
    });
    expect(r.body.doseGrams).toBeCloseTo(120, 9);
    expect(r.body.weighed).toMatchObject({ grams: 120, step: 1 });
    expect(r.body.firstDose.doseGrams).toBeCloseTo(60, 9);
    expect(r.body.firstDose.concentration).toBeCloseTo(1.5, 12);
  });

  it("answers the concentration weighed grams make, and the same grams as the brine answer's activeGrams", async () => {
    const made = await get({ ...dry, addedGrams: 50 });
    expect(made.body.concentration).toBeCloseTo(1.25, 12);
    const brine = await get({ agent: "salt", stockFormId: "brine-10", volume: 40, volumeUnit: "L", target: 3 });
    expect(brine.body.form).toBe("stock");
    expect(brine.body.doseMl).toBeCloseTo(1200, 9);
    expect(brine.body.activeGrams).toBeCloseTo(120, 9);
  });

  it("warns above the catalogue's plausible ceiling for salt", async () => {
    const r = await get({ ...dry, target: 40 });
    expect(r.body.warnings.map((w: { code: string }) => w.code)).toContain("above_ceiling");
  });

  it("answers 422 naming the field for a dry plan of a treatment dosed in mL, or with a stock given", async () => {
    const peroxide = await get({ ...dry, agent: "hydrogen-peroxide", target: 20 });
    expect(peroxide.status).toBe(422);
    expect(peroxide.body.error.issues[0].path).toBe("form");
    const stock = await get({ ...dry, stockPercent: 10, target: 3 });
    expect(stock.status).toBe(422);
    expect(stock.body.error.issues[0].path).toBe("stockPercent");
    const both = await get({ ...dry, addedMl: 5 });
    expect(both.status).toBe(422);
    expect(both.body.error.issues[0].path).toBe("addedMl");
  });

  it("writes grams into the calendar file's dose events", async () => {
    const r = await call(
      icsRoute.GET,
      `/api/dose/plan.ics?${qs({ ...dry, target: 3, fraction: 0.5, start: "2026-12-02T18:00:00Z", doses: 1 })}`,
    );
    expect(r.status).toBe(200);
    const text = typeof r.body === "string" ? r.body : await r.res.text();
    const events = new ICAL.Component(ICAL.parse(text)).getAllSubcomponents("vevent").map((v) => new ICAL.Event(v));
    const dose = events.find((e) => /Dose 1 of 1/.test(e.summary))!;
    expect(dose.summary).toContain("dissolve 60 g of dry salt");
    expect(dose.summary).toContain("1.5 g/L");
  });
});
