import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it, vi } from "vitest";
import * as entriesRoute from "@/app/api/reports/[id]/entries/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as submitRoute from "@/app/api/reports/[id]/submit/route";
import * as reportsRoute from "@/app/api/reports/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import * as queries from "@/features/reports/server/queries";
import type { ReportRow } from "@/features/reports/server/mapping";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

// The first look a change takes at its report (before its transaction) can be replayed as it was a moment earlier.
vi.mock("@/features/reports/server/queries", async (importOriginal) => {
  const real = await importOriginal<typeof import("@/features/reports/server/queries")>();
  return { ...real, getReportRowById: vi.fn(real.getReportRowById) };
});

type U = Awaited<ReturnType<typeof signedInUser>>;
let owner: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  owner = await signedInUser("member", "Rhea Racer");
});

const stored = async (id: string) =>
  (await (await getDb()).select().from(schema.reports).where(eq(schema.reports.id, id)))[0]!;

/**
 * A change whose first look saw a draft, while a submit committed before its write (what two requests at the
 * same moment do on a PostgreSQL server): the write must find the report submitted and change nothing. 100 L of
 * 3 % w/v (30 mg/mL): 100 mL makes 30 mg/L; 1000 mL would make 300 mg/L, twice the catalogue's plausible ceiling
 * for hydrogen peroxide (150 mg/L), on a report whose flags were computed at 30.
 */
async function submittedAfterFirstLook(): Promise<string> {
  const made = await call(reportsRoute.POST, "/api/reports", {
    cookie: owner.cookie,
    body: reportBody({ water: { volume: 100 }, treatment: { amountMl: 100 } }),
  });
  const id = made.body.id as string;
  const asDraft: ReportRow = await stored(id);
  const submit = await call(submitRoute.POST, `/api/reports/${id}/submit`, {
    params: { id },
    cookie: owner.cookie,
    method: "POST",
  });
  expect(submit.status).toBe(200);
  vi.mocked(queries.getReportRowById).mockResolvedValueOnce(asDraft);
  return id;
}

describe("a change racing a submit", () => {
  it("PATCH: refused with 409 under the report's lock, and the submitted figures stand", async () => {
    const id = await submittedAfterFirstLook();
    const patch = await call(reportRoute.PATCH, `/api/reports/${id}`, {
      params: { id },
      cookie: owner.cookie,
      method: "PATCH",
      body: { treatment: { amountMl: 1000 } },
    });
    expect(patch.status).toBe(409);
    expect(patch.body.error).toMatchObject({ code: "conflict", message: expect.stringMatching(/nothing was changed/) });
    const row = await stored(id);
    expect(row.status).toBe("awaiting_review");
    expect(row.amountMl).toBe(100);
    expect(row.concentration).toBeCloseTo(30, 9);
  });

  it("a logged dose: refused with 409, no entry, the course stays closed", async () => {
    const id = await submittedAfterFirstLook();
    const entry = await call(entriesRoute.POST, `/api/reports/${id}/entries`, {
      params: { id },
      cookie: owner.cookie,
      body: { kind: "dose", at: new Date(Date.now() - 3_600_000).toISOString(), amountMl: 900, confirm: true },
    });
    expect(entry.status).toBe(409);
    const entries = await (
      await getDb()
    )
      .select()
      .from(schema.courseEntries)
      .where(eq(schema.courseEntries.reportId, id));
    expect(entries).toEqual([]);
    const row = await stored(id);
    expect(row.amountMl).toBe(100);
    expect(row.courseOpen).toBe(false);
  });

  it("PATCH and submit sent together: the figures and the flags computed at submission agree", async () => {
    const made = await call(reportsRoute.POST, "/api/reports", {
      cookie: owner.cookie,
      body: reportBody({ water: { volume: 100 }, treatment: { amountMl: 100 } }),
    });
    const id = made.body.id as string;
    const [patch] = await Promise.all([
      call(reportRoute.PATCH, `/api/reports/${id}`, {
        params: { id },
        cookie: owner.cookie,
        method: "PATCH",
        body: { treatment: { amountMl: 1000 } },
      }),
      call(submitRoute.POST, `/api/reports/${id}/submit`, { params: { id }, cookie: owner.cookie, method: "POST" }),
    ]);
    const row = await stored(id);
    if (patch.status === 200) expect(row.flags.map((f) => f.code)).toContain("above_ceiling");
    else expect(row.concentration).toBeCloseTo(30, 9);
  });
});
