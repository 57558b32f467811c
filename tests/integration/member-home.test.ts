import { beforeAll, describe, expect, it } from "vitest";
import * as reportsRoute from "@/app/api/reports/route";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as entriesRoute from "@/app/api/reports/[id]/entries/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { getMemberHome } from "@/features/reports/server";
import { countAwaitingReview } from "@/features/review/server";
import type { Role } from "@/features/shared/roles";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let keeper: U, bystander: U, mod: U;
const HOUR = 3600_000;
const actorOf = (u: U, role: Role) => ({ id: u.id, name: u.name, email: u.email, role });
let courseId: string, draftId: string, returnedId: string, acceptedId: string, waitingId: string;
let t0: Date;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  keeper = await signedInUser("member");
  bystander = await signedInUser("member");
  mod = await signedInUser("moderator");

  // An open course of 3 % w/v peroxide in 40 L with one 33 mL dose, a dose every 48 h.
  const c = await call(draftsRoute.POST, "/api/reports/drafts", {
    cookie: keeper.cookie,
    body: {
      courseOpen: true,
      speciesId: "paracheirodon-innesi",
      fishCount: 6,
      water: { volume: 40, volumeUnit: "L" },
      treatment: { agentSlug: "hydrogen-peroxide", stockPercent: 3, stockBasis: "w/v", intervalHours: 48 },
    },
  });
  courseId = c.body.id;
  t0 = new Date(Date.now() - 2 * HOUR);
  expect(
    (
      await call(entriesRoute.POST, `/api/reports/${courseId}/entries`, {
        params: { id: courseId },
        cookie: keeper.cookie,
        body: { kind: "dose", at: t0.toISOString(), amountMl: 33 },
      })
    ).status,
  ).toBe(201);

  draftId = (await call(draftsRoute.POST, "/api/reports/drafts", { cookie: keeper.cookie, body: { fishCount: 2 } }))
    .body.id;
  const submit = async () =>
    (await call(reportsRoute.POST, "/api/reports", { body: reportBody({ submit: true }), cookie: keeper.cookie })).body
      .id as string;
  returnedId = await submit();
  acceptedId = await submit();
  waitingId = await submit();
  const decide = (id: string, body: unknown) =>
    call(decisionRoute.POST, `/api/reports/${id}/decision`, { params: { id }, cookie: mod.cookie, body });
  expect((await decide(returnedId, { decision: "return", note: "Please add the water temperature." })).status).toBe(
    200,
  );
  expect((await decide(acceptedId, { decision: "accept" })).status).toBe(200);
});

describe("a member's home", () => {
  it("shows the keeper's open course with its next dose, returned reports with the note, drafts and recent decisions", async () => {
    const home = await getMemberHome({ actor: actorOf(keeper, "member") });
    expect(home.openCourses.map((c) => c.id)).toEqual([courseId]);
    // Hand computation: 3 % w/v = 30 mg/mL; 33 mL × 30 mg/mL ÷ 40 L = 24.75 mg/L, due 48 h after the dose.
    expect(home.openCourses[0]!.nextDose).toMatchObject({
      at: new Date(t0.getTime() + 48 * HOUR).toISOString(),
      doseMl: 33,
      unit: "mg/L",
      first: false,
    });
    expect(home.openCourses[0]!.nextDose!.concentration).toBeCloseTo(24.75, 9);
    expect(home.returned).toEqual([
      expect.objectContaining({ id: returnedId, note: "Please add the water temperature." }),
    ]);
    expect(home.drafts.map((d) => d.id)).toEqual([draftId]);
    expect(home.recentDecisions.map((d) => [d.reportId, d.action]).sort()).toEqual(
      [
        [acceptedId, "accept"],
        [returnedId, "return"],
      ].sort(),
    );
    expect(home.oldestAwaiting).toBeNull();
  });

  it("shows another member none of the keeper's reports", async () => {
    const home = await getMemberHome({ actor: actorOf(bystander, "member") });
    expect(home).toEqual({ openCourses: [], returned: [], drafts: [], recentDecisions: [], oldestAwaiting: null });
  });

  it("gives a moderator the oldest report waiting for review, beside the queue's count", async () => {
    const actor = actorOf(mod, "moderator");
    const home = await getMemberHome({ actor });
    expect(home.oldestAwaiting).toMatchObject({ id: waitingId });
    expect(await countAwaitingReview({ actor })).toBe(1);
    expect(home.openCourses).toEqual([]);
  });

  it("refuses a visitor", async () => {
    await expect(getMemberHome({ actor: null })).rejects.toMatchObject({ code: "unauthenticated" });
  });
});
