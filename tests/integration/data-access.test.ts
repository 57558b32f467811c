import { settleBackgroundMail } from "@/features/members/server";
import { beforeAll, describe, expect, it } from "vitest";
import * as authRoute from "@/app/api/auth/[...all]/route";
import { getDb } from "@/db/client";
import {
  createCatalogueEntry,
  getCatalogueChanges,
  getClubSettingsForEdit,
  seedCatalogue,
  updateClubSettings,
  getClubSettings,
} from "@/features/catalogue/server";
import { getExchangeOverview } from "@/features/exchange/server";
import { listCaughtMail, maskLinks, readCaughtMail } from "@/features/mail/server";
import {
  changeMemberRole,
  getActor,
  getMemberById,
  getMembers,
  getRoleChangesByUserId,
} from "@/features/members/server";
import {
  createDraft,
  createReport,
  getReportById,
  getReportFormCatalogue,
  getReportHistory,
  getReportsByAuthorId,
} from "@/features/reports/server";
import { countAwaitingReview, getGroupContext, getReviewPage, getReviewQueue } from "@/features/review/server";
import { listMembersQuerySchema } from "@/features/members";
import { listMineQuerySchema } from "@/features/reports";
import { AppError, type ErrorCode } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { call } from "../support/http";
import { linkIn, mailTo, reportBody, signedInUser } from "../support/factories";

// The data functions behind the pages, called directly with each kind of caller: the check lives
// in them, so a page (or anything else) that calls them cannot skip it.

type Who = "visitor" | "memberA" | "memberB" | "moderator" | "admin";
const actors = {} as Record<Who, Actor | null>;
const NOTES_A = "Notes only member A and the moderators may read (zebra-quartz).";
let submittedId = "";
let draftId = "";
let resetToken = "";

async function actorFor(cookie: string): Promise<Actor> {
  const a = await getActor(new Headers({ cookie }));
  if (!a) throw new Error("no session");
  return a;
}

/** The error code a call fails with, or "ok". */
async function outcome(p: Promise<unknown>): Promise<ErrorCode | "ok"> {
  try {
    await p;
    return "ok";
  } catch (err) {
    if (err instanceof AppError) return err.code;
    throw err;
  }
}

async function outcomes(run: (actor: Actor | null) => Promise<unknown>): Promise<Record<Who, ErrorCode | "ok">> {
  const out = {} as Record<Who, ErrorCode | "ok">;
  for (const who of Object.keys(actors) as Who[]) out[who] = await outcome(run(actors[who]));
  return out;
}

const adminOnly = {
  visitor: "unauthenticated",
  memberA: "forbidden",
  memberB: "forbidden",
  moderator: "forbidden",
  admin: "ok",
};
const reviewersOnly = {
  visitor: "unauthenticated",
  memberA: "forbidden",
  memberB: "forbidden",
  moderator: "ok",
  admin: "ok",
};

beforeAll(async () => {
  await seedCatalogue(await getDb());
  const [a, b, m, ad] = await Promise.all([
    signedInUser("member", "Ada Testmember"),
    signedInUser("member", "Bram Testmember"),
    signedInUser("moderator"),
    signedInUser("admin"),
  ]);
  actors.visitor = null;
  actors.memberA = await actorFor(a.cookie);
  actors.memberB = await actorFor(b.cookie);
  actors.moderator = await actorFor(m.cookie);
  actors.admin = await actorFor(ad.cookie);

  submittedId = (await createReport(actors.memberA, reportBody({ submit: true, outcome: { notes: NOTES_A } }) as never))
    .id;
  draftId = (await createDraft(actors.memberA, { fishCount: 3, outcome: { notes: "A private draft note." } } as never))
    .id;
  // Two role changes for the log, and one catalogue change.
  await changeMemberRole(actors.admin, actors.memberB!.id, "moderator");
  await changeMemberRole(actors.admin, actors.memberB!.id, "member");
  await createCatalogueEntry(actors.admin, "conditions", { slug: "test-condition", name: "Test condition" } as never);

  // The takeover path's first step: anyone may ask a reset for the admin's address.
  const ask = await call(authRoute.POST, "/api/auth/request-password-reset", {
    body: { email: ad.email, redirectTo: "/reset-password" },
  });
  expect(ask.status).toBe(200);
  await settleBackgroundMail();
  const mail = mailTo(ad.email).find((x) => /Subject: Choose a new Tanklore password/.test(x))!;
  // better-auth puts the reset token in the link's path: /api/auth/reset-password/<token>?callbackURL=…
  resetToken = new URL(linkIn(mail)).pathname.split("/").pop()!;
  expect(resetToken.length).toBeGreaterThanOrEqual(16);
});

describe("the mail outbox", () => {
  it("is for admins only: visitors are asked to sign in, everyone else is refused", async () => {
    expect(await outcomes((actor) => listCaughtMail({ actor }))).toEqual(adminOnly);
    const [first] = await listCaughtMail({ actor: actors.admin });
    expect(await outcomes((actor) => readCaughtMail({ actor }, first!.id))).toEqual(adminOnly);
  });

  it("shows an admin who got which message and when, with every link's token masked", async () => {
    const all = await listCaughtMail({ actor: actors.admin });
    const reset = all.find((m) => m.subject === "Choose a new Tanklore password")!;
    expect(reset.to).toContain(actors.admin!.email);
    expect(Date.parse(reset.receivedAt)).not.toBeNaN();
    const one = (await readCaughtMail({ actor: actors.admin }, reset.id))!;
    expect(JSON.stringify(one)).not.toContain(resetToken);
    expect(JSON.stringify(all)).not.toContain(resetToken);
    expect(one.text).toContain("/api/auth/reset-password/•••?callbackURL=•••");
  });

  it("masks query values, fragments and long path segments but keeps report ids readable", () => {
    expect(
      maskLinks("Open https://club.example.org/api/auth/verify-email?token=eyJhbGciOi.x.y&callbackURL=%2F now"),
    ).toBe("Open https://club.example.org/api/auth/verify-email?token=•••&callbackURL=••• now");
    expect(
      maskLinks(
        "https://club.example.org/api/auth/reset-password/Q2x1YlRva2VuMTIzNDU2Nzg5?callbackURL=%2Freset-password",
      ),
    ).toBe("https://club.example.org/api/auth/reset-password/•••?callbackURL=•••");
    const report = "https://club.example.org/reports/0f8fad5b-d9cb-469f-a165-70867728950e";
    expect(maskLinks(`See ${report}`)).toBe(`See ${report}`);
    expect(maskLinks('<a href="https://club.example.org/x#secret-part">x</a>')).toBe(
      '<a href="https://club.example.org/x#•••">x</a>',
    );
  });
});

describe("members and the role-change log", () => {
  it("lists members and the log for admins only", async () => {
    const q = listMembersQuerySchema.parse({});
    expect(await outcomes((actor) => getMembers({ actor }, q))).toEqual(adminOnly);
    expect(await outcomes((actor) => getRoleChangesByUserId({ actor }))).toEqual(adminOnly);
    const list = await getMembers({ actor: actors.admin }, listMembersQuerySchema.parse({ q: "Testmember" }));
    expect(list.members.map((m) => m.email)).toContain(actors.memberA!.email);
    const log = await getRoleChangesByUserId({ actor: actors.admin }, actors.memberB!.id);
    expect(log.map((c) => `${c.fromRole}->${c.toRole}`)).toEqual(["moderator->member", "member->moderator"]);
  });

  it("shows a member their own account and no one else's", async () => {
    expect(await outcomes((actor) => getMemberById({ actor }, actors.memberA!.id))).toEqual({
      visitor: "unauthenticated",
      memberA: "ok",
      memberB: "forbidden",
      moderator: "forbidden",
      admin: "ok",
    });
  });
});

describe("catalogue, settings and exchange pages", () => {
  it("keep the change log, the settings form and the exchange overview for admins", async () => {
    expect(await outcomes((actor) => getCatalogueChanges({ actor }))).toEqual(adminOnly);
    expect(await outcomes((actor) => getClubSettingsForEdit({ actor }))).toEqual(adminOnly);
    expect(await outcomes((actor) => getExchangeOverview({ actor }))).toEqual(adminOnly);
    const changes = await getCatalogueChanges({ actor: actors.admin });
    expect(changes.some((c) => c.entityKey === "test-condition")).toBe(true);
  });

  it("lets only admins change the settings, whoever calls the function", async () => {
    const current = await getClubSettings();
    const input = {
      name: current.name,
      confidenceLevel: current.confidenceLevel,
      minReports: current.minReports,
      defaultVolumeUnit: current.defaultVolumeUnit,
      defaultTemperatureUnit: current.defaultTemperatureUnit,
    };
    expect(await outcomes((actor) => updateClubSettings(actor, input as never))).toEqual(adminOnly);
  });
});

describe("review", () => {
  it("gives the queue, its count, the dose context and the review page to moderators and admins only", async () => {
    expect(await outcomes((actor) => countAwaitingReview({ actor }))).toEqual(reviewersOnly);
    expect(await outcomes((actor) => getReviewQueue(actor))).toEqual(reviewersOnly);
    expect(await outcomes((actor) => getGroupContext({ actor }, "tetras", "hydrogen-peroxide", 10))).toEqual(
      reviewersOnly,
    );
    expect(await outcomes((actor) => getReviewPage({ actor }, submittedId))).toEqual(reviewersOnly);
    const page = await getReviewPage({ actor: actors.moderator }, submittedId);
    expect(page.report.outcome.notes).toBe(NOTES_A);
    expect(page.history.events.map((e) => e.action)).toContain("submitted");
  });

  it("has no review page for a draft", async () => {
    expect(await outcome(getReviewPage({ actor: actors.moderator }, draftId))).toBe("not_found");
  });
});

describe("reports", () => {
  it("show a submitted report to its author and the reviewers; to anyone else it does not exist", async () => {
    expect(await outcomes((actor) => getReportById(actor, submittedId))).toEqual({
      visitor: "not_found",
      memberA: "ok",
      memberB: "not_found",
      moderator: "ok",
      admin: "ok",
    });
    expect(await outcomes((actor) => getReportHistory(actor, submittedId))).toEqual({
      visitor: "not_found",
      memberA: "ok",
      memberB: "not_found",
      moderator: "ok",
      admin: "ok",
    });
  });

  it("keep a draft to its author", async () => {
    expect(await outcomes((actor) => getReportById(actor, draftId))).toEqual({
      visitor: "not_found",
      memberA: "ok",
      memberB: "not_found",
      moderator: "not_found",
      admin: "not_found",
    });
  });

  it("list only the caller's own reports, and the form needs a signed-in member", async () => {
    const q = listMineQuerySchema.parse({});
    expect(await outcome(getReportsByAuthorId(null, q))).toBe("unauthenticated");
    const mineA = await getReportsByAuthorId(actors.memberA, q);
    expect(mineA.reports.map((r) => r.id).sort()).toEqual([submittedId, draftId].sort());
    expect((await getReportsByAuthorId(actors.memberB, q)).total).toBe(0);
    expect(await outcome(getReportFormCatalogue({ actor: null }))).toBe("unauthenticated");
    expect((await getReportFormCatalogue({ actor: actors.memberB })).agents.length).toBeGreaterThan(0);
  });
});
