import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import * as reportsRoute from "@/app/api/reports/route";
import * as reportRoute from "@/app/api/reports/[id]/route";
import * as submitRoute from "@/app/api/reports/[id]/submit/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import * as correctionsRoute from "@/app/api/reports/[id]/corrections/route";
import * as historyRoute from "@/app/api/reports/[id]/history/route";
import * as queueRoute from "@/app/api/review/queue/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { sendModeratorDigests } from "@/features/review/server";
import { call } from "../support/http";
import { mailTo, reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let member: U, other: U, mod: U, mod2: U, admin: U;

beforeAll(async () => {
  await seedCatalogue(await getDb());
  member = await signedInUser("member", "Mira Member");
  other = await signedInUser("member");
  mod = await signedInUser("moderator", "Moe Moderator");
  mod2 = await signedInUser("moderator", "Nia Second");
  admin = await signedInUser("admin");
});

async function submitted(body = reportBody({ submit: true }), by = member) {
  const r = await call(reportsRoute.POST, "/api/reports", { body, cookie: by.cookie });
  expect(r.body.status).toBe("awaiting_review");
  return r.body.id as string;
}
const decide = (id: string, cookie: string | undefined, body: unknown) =>
  call(decisionRoute.POST, `/api/reports/${id}/decision`, { params: { id }, cookie, body });

describe("decisions and who may make them", () => {
  it("refuses visitors (401) and members (403), and the author even when a moderator (403)", async () => {
    const id = await submitted();
    expect((await decide(id, undefined, { decision: "accept" })).status).toBe(401);
    const m = await decide(id, other.cookie, { decision: "accept" });
    expect(m.status).toBe(403);
    expect(m.body.error.code).toBe("forbidden");
    const own = await submitted(reportBody({ submit: true }), mod);
    const self = await decide(own, mod.cookie, { decision: "accept" });
    expect(self.status).toBe(403);
    expect(self.body.error.message).toMatch(/own report/);
    expect((await decide(own, mod2.cookie, { decision: "accept" })).body.status).toBe("accepted");
  });

  it("needs a note to return, decline or retract", async () => {
    const id = await submitted();
    for (const decision of ["return", "decline"]) {
      const r = await decide(id, mod.cookie, { decision });
      expect(r.status).toBe(422);
      expect(r.body.error.issues[0]).toMatchObject({ path: "note" });
    }
    expect((await decide(id, mod.cookie, { decision: "approve" })).status).toBe(422);
    const [row] = await (await getDb()).select().from(schema.reports).where(eq(schema.reports.id, id));
    expect(row!.status).toBe("awaiting_review");
  });

  it("declines with a reason, and answers 409 to a decision on a report that has moved on", async () => {
    const id = await submitted();
    expect(
      (await decide(id, mod.cookie, { decision: "decline", note: "The volume cannot be right for this tank." })).body
        .status,
    ).toBe("declined");
    const late = await decide(id, mod2.cookie, { decision: "accept" });
    expect(late.status).toBe(409);
    expect(late.body.error.message).toMatch(
      /declined.*Moe Moderator declined it \(“The volume cannot be right for this tank\.”\)/,
    );
    // Said in words: no internal value (accept, awaiting_review) and no ISO time reaches the moderator.
    expect(late.body.error.message).toMatch(/your decision \(accept\)/);
    expect(late.body.error.message).not.toMatch(/\b[a-z]+_[a-z_]+\b|\d{4}-\d{2}-\d{2}T/);
    expect((await decide(id, mod.cookie, { decision: "retract", note: "x y z" })).status).toBe(409);
  });

  it("lets only one of two moderators deciding at once win; the other gets 409", async () => {
    const id = await submitted();
    const [x, y] = await Promise.all([
      decide(id, mod.cookie, { decision: "accept" }),
      decide(id, mod2.cookie, { decision: "return", note: "Add photos please." }),
    ]);
    expect([x.status, y.status].sort()).toEqual([200, 409]);
    const events = await call(historyRoute.GET, `/api/reports/${id}/history`, {
      params: { id },
      cookie: member.cookie,
    });
    expect(events.body.events.filter((e: { action: string }) => ["accept", "return"].includes(e.action))).toHaveLength(
      1,
    );
  });

  it("retracts an accepted report with a reason; an admin may decide too", async () => {
    const id = await submitted();
    expect((await decide(id, admin.cookie, { decision: "accept" })).body.status).toBe("accepted");
    expect(
      (await decide(id, mod.cookie, { decision: "retract", note: "A duplicate of another report." })).body.status,
    ).toBe("retracted");
  });
});

describe("a dose above the agent's plausible ceiling", () => {
  // 400 mL of 3 % w/v stock in the factory's 40 L tank is 300 mg/L, above the starter catalogue's ceiling of 150 mg/L.
  const hotBody = () => reportBody({ submit: true, treatment: { amountMl: 400 } });

  it("cannot be accepted by one moderator without an override note (422 naming note); nothing changes", async () => {
    const id = await submitted(hotBody());
    for (const note of [undefined, "Looks fine."]) {
      const r = await decide(
        id,
        mod.cookie,
        note === undefined ? { decision: "accept" } : { decision: "accept", note },
      );
      expect(r.status).toBe(422);
      expect(r.body.error.code).toBe("invalid");
      expect(r.body.error.issues[0].path).toBe("note");
      expect(r.body.error.issues[0].message).toMatch(/override note of at least 20 characters/);
    }
    const [row] = await (await getDb()).select().from(schema.reports).where(eq(schema.reports.id, id));
    expect(row!.status).toBe("awaiting_review");
    const h = await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: mod.cookie });
    expect(h.body.events.map((e: { action: string }) => e.action)).toEqual(["created", "submitted"]);
  });

  it("is accepted by one moderator with an override note, which the history keeps", async () => {
    const id = await submitted(hotBody());
    const note = "Member re-measured the stock by titration; dose confirmed.";
    const r = await decide(id, mod.cookie, { decision: "accept", note });
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ id, status: "accepted" });
    const h = await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: member.cookie });
    expect(h.body.events.at(-1)).toMatchObject({
      action: "accept",
      from: "awaiting_review",
      to: "accepted",
      note,
      actor: { name: "Moe Moderator" },
    });
  });

  it("is accepted without a note once a second moderator accepts after the first one's proposal", async () => {
    const id = await submitted(hotBody());
    const first = await decide(id, mod.cookie, { decision: "propose_accept" });
    expect(first.body).toEqual({ id, status: "awaiting_review" });
    // The proposer alone cannot complete it.
    expect((await decide(id, mod.cookie, { decision: "accept" })).status).toBe(422);
    expect((await decide(id, mod.cookie, { decision: "propose_accept" })).status).toBe(409);
    expect((await decide(id, mod2.cookie, { decision: "accept" })).body.status).toBe("accepted");
    const h = await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: mod.cookie });
    expect(h.body.events.map((e: { action: string; actor: { name: string } }) => [e.action, e.actor.name])).toEqual([
      ["created", "Mira Member"],
      ["submitted", "Mira Member"],
      ["propose_accept", "Moe Moderator"],
      ["accept", "Nia Second"],
    ]);
  });

  it("does not need a second moderator when the dose is within the ceiling", async () => {
    const id = await submitted();
    expect((await decide(id, mod.cookie, { decision: "propose_accept" })).status).toBe(409);
    expect((await decide(id, mod.cookie, { decision: "accept" })).body.status).toBe("accepted");
  });
});

describe("a return → resubmit → accept cycle", () => {
  it("keeps every step in the history with actor and note, and mails the member once per decision", async () => {
    const id = await submitted();
    const mailsBefore = mailTo(member.email).filter((m) => /Subject: Your Tanklore report was/.test(m)).length;
    const ret = await decide(id, mod.cookie, { decision: "return", note: "Please give the pH you measured." });
    expect(ret.body.status).toBe("returned");
    const seen = await call(reportRoute.GET, `/api/reports/${id}`, { params: { id }, cookie: member.cookie });
    expect(seen.body.lastNote).toMatchObject({ action: "return", note: "Please give the pH you measured." });
    expect(
      (
        await call(reportRoute.PATCH, `/api/reports/${id}`, {
          params: { id },
          cookie: member.cookie,
          method: "PATCH",
          body: { water: { ph: 6.8 } },
        })
      ).status,
    ).toBe(200);
    expect(
      (
        await call(submitRoute.POST, `/api/reports/${id}/submit`, {
          params: { id },
          cookie: member.cookie,
          method: "POST",
        })
      ).body.status,
    ).toBe("awaiting_review");
    expect((await decide(id, mod.cookie, { decision: "accept", note: "Thanks." })).body.status).toBe("accepted");

    const h = await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: member.cookie });
    expect(h.body.events.map((e: { action: string; from: string; to: string }) => [e.action, e.from, e.to])).toEqual([
      ["created", null, "draft"],
      ["submitted", "draft", "awaiting_review"],
      ["return", "awaiting_review", "returned"],
      ["resubmitted", "returned", "awaiting_review"],
      ["accept", "awaiting_review", "accepted"],
    ]);
    expect(h.body.events[2]).toMatchObject({
      actor: { name: "Moe Moderator" },
      note: "Please give the pH you measured.",
    });
    expect(h.body.events[3].actor.name).toBe("Mira Member");
    const mails = mailTo(member.email).filter((m) => /Subject: Your Tanklore report was/.test(m));
    expect(mails.length - mailsBefore).toBe(2);
    expect(
      mails.some(
        (m) =>
          /returned for changes/.test(m) && /Please give the pH you measured/.test(m) && m.includes(`/reports/${id}`),
      ),
    ).toBe(true);
    expect(mails.some((m) => /Subject: Your Tanklore report was accepted/.test(m))).toBe(true);
  });
});

describe("the queue and its flags", () => {
  it("shows reports awaiting review, oldest first, each with its plausibility flags", async () => {
    const off = await submitted(reportBody({ submit: true, treatment: { statedConcentration: 39 } })); // computed 30: 30 % off
    const hot = await submitted(
      reportBody({ submit: true, water: { temperature: 36, ph: 9.6 }, treatment: { amountMl: 400 } }),
    ); // 300 mg/L
    const odd = await submitted(reportBody({ submit: true, speciesId: null, speciesOther: "Hyphessobrycon sp. red" }));
    const r = await call(queueRoute.GET, "/api/review/queue", { cookie: mod.cookie });
    expect(r.status).toBe(200);
    const byId = new Map(
      r.body.reports.map((x: { id: string; flags: { code: string }[] }) => [x.id, x.flags.map((f) => f.code)]),
    );
    expect(byId.get(off)).toContain("stated_mismatch");
    expect(byId.get(hot)).toEqual(
      expect.arrayContaining(["above_ceiling", "temperature_unusual", "ph_unusual", "no_photos"]),
    );
    expect(byId.get(odd)).toContain("species_not_listed");
    const times = r.body.reports.map((x: { submittedAt: string }) => x.submittedAt);
    expect([...times].sort()).toEqual(times);
    expect((await call(queueRoute.GET, "/api/review/queue", { cookie: member.cookie })).status).toBe(403);
    expect((await call(queueRoute.GET, "/api/review/queue")).status).toBe(401);
  });

  it("flags a suspected duplicate and a dose far outside the group's accepted span", async () => {
    const first = await submitted();
    await decide(first, mod.cookie, { decision: "accept" });
    const dupe = await submitted(reportBody({ submit: true, startedOn: "2026-11-03" }));
    const tiny = await submitted(reportBody({ submit: true, treatment: { amountMl: 2 } }), other); // 1.5 mg/L vs accepted 30
    const [d] = await (await getDb()).select().from(schema.reports).where(eq(schema.reports.id, dupe));
    expect(d!.flags.map((f) => f.code)).toContain("suspected_duplicate");
    const [t] = await (await getDb()).select().from(schema.reports).where(eq(schema.reports.id, tiny));
    expect(t!.flags.map((f) => f.code)).toContain("outside_group_range");
    expect(t!.flags.map((f) => f.code)).not.toContain("suspected_duplicate");
  });

  it("maps a not-listed species with a note, which lets the report be accepted", async () => {
    const id = await submitted(reportBody({ submit: true, speciesId: null, speciesOther: "bronze cory" }));
    const refused = await decide(id, mod.cookie, { decision: "accept" });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/map it/);
    const map = await call(correctionsRoute.POST, `/api/reports/${id}/corrections`, {
      params: { id },
      cookie: mod.cookie,
      body: { kind: "species", speciesId: "corydoras-aeneus", note: "Bronze cory is C. aeneus." },
    });
    expect(map.status).toBe(200);
    expect((await decide(id, mod.cookie, { decision: "accept" })).body.status).toBe("accepted");
    const h = await call(historyRoute.GET, `/api/reports/${id}/history`, { params: { id }, cookie: mod.cookie });
    expect(h.body.events.find((e: { action: string }) => e.action === "map_species").note).toMatch(
      /bronze cory → Corydoras aeneus/,
    );
    const byMember = await call(correctionsRoute.POST, `/api/reports/${id}/corrections`, {
      params: { id },
      cookie: member.cookie,
      body: { kind: "lossCause", lossCause: "disease", note: "nope" },
    });
    expect(byMember.status).toBe(403);
  });

  it("mails moderators a digest of new reports at most once an hour", async () => {
    await submitted();
    const now = new Date();
    const n1 = await sendModeratorDigests(now);
    expect(n1).toBeGreaterThanOrEqual(2);
    expect(mailTo(mod2.email).filter((m) => /awaiting review/.test(m))).toHaveLength(1);
    await submitted();
    expect(await sendModeratorDigests(new Date(now.getTime() + 30 * 60_000))).toBe(0);
    expect(await sendModeratorDigests(new Date(now.getTime() + 61 * 60_000))).toBeGreaterThanOrEqual(2);
    expect(mailTo(mod2.email).filter((m) => /awaiting review/.test(m))).toHaveLength(2);
  });
});

describe("the audit trail", () => {
  it("is append-only: no code path updates or deletes report events", async () => {
    const { execSync } = await import("node:child_process");
    // Every write to report_events in the source is an insert (deleting a draft removes its own trail with it).
    const hits = execSync(
      "grep -rnE 'update\\(reportEvents\\)|delete\\(reportEvents\\)|update report_events|delete from report_events' features app db || true",
      { encoding: "utf8" },
    );
    expect(hits.trim()).toBe("");
  });
});
