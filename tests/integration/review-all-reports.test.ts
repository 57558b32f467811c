import { beforeAll, describe, expect, it } from "vitest";
import * as reportsRoute from "@/app/api/reports/route";
import * as draftsRoute from "@/app/api/reports/drafts/route";
import * as decisionRoute from "@/app/api/reports/[id]/decision/route";
import { getDb } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

type U = Awaited<ReturnType<typeof signedInUser>>;
let wren: U, otto: U, mod: U, admin: U;
const ids: Record<string, string> = {};

async function file(author: U, over: Record<string, unknown>) {
  const r = await call(reportsRoute.POST, "/api/reports", {
    body: reportBody({ ...over, submit: true }),
    cookie: author.cookie,
  });
  expect(r.status).toBe(201);
  return r.body.id as string;
}
const decide = (id: string, decision: string, note = "") =>
  call(decisionRoute.POST, `/api/reports/${id}/decision`, {
    params: { id },
    cookie: mod.cookie,
    body: { decision, note },
  });
const list = (q: string, who: U | null = mod) =>
  call(reportsRoute.GET, `/api/reports?scope=all${q}`, { cookie: who?.cookie });

beforeAll(async () => {
  await seedCatalogue(await getDb());
  wren = await signedInUser("member", "Wren Appleby");
  otto = await signedInUser("member", "Otto Brightwater");
  mod = await signedInUser("moderator");
  admin = await signedInUser("admin");
  // Neon tetras (tetras group) and peppered corydoras (corydoras), peroxide at 30, 40, 50 and 60 mL in 40 L of 3 %.
  ids.tetraAccepted = await file(wren, { treatment: { amountMl: 30 }, startedOn: "2026-10-01" });
  ids.tetraWaiting = await file(wren, { treatment: { amountMl: 40 }, startedOn: "2026-10-05" });
  ids.coryAccepted = await file(otto, {
    speciesId: "corydoras-paleatus",
    treatment: { amountMl: 50 },
    startedOn: "2026-09-20",
  });
  ids.coryDeclined = await file(otto, {
    speciesId: "corydoras-paleatus",
    treatment: { amountMl: 60 },
    startedOn: "2026-09-25",
  });
  expect((await decide(ids.tetraAccepted, "accept")).status).toBe(200);
  expect((await decide(ids.coryAccepted, "accept")).status).toBe(200);
  expect((await decide(ids.coryDeclined, "decline", "Not a treatment course.")).status).toBe(200);
  const draft = await call(draftsRoute.POST, "/api/reports/drafts", {
    body: { speciesId: "paracheirodon-innesi" },
    cookie: wren.cookie,
  });
  expect(draft.status).toBe(201);
  ids.draft = draft.body.id;
});

const idsOf = (body: { reports: { id: string }[] }) => body.reports.map((r) => r.id).sort();

describe("the moderators' list of every report", () => {
  it("lists every submitted report, never a draft, with who filed it and its status", async () => {
    const r = await list("");
    expect(r.status).toBe(200);
    expect(r.body.total).toBe(4);
    expect(idsOf(r.body)).toEqual([ids.tetraAccepted, ids.tetraWaiting, ids.coryAccepted, ids.coryDeclined].sort());
    expect(idsOf(r.body)).not.toContain(ids.draft);
    const row = r.body.reports.find((x: { id: string }) => x.id === ids.coryDeclined);
    expect(row).toMatchObject({
      status: "declined",
      groupSlug: "corydoras",
      agentSlug: "hydrogen-peroxide",
      member: { id: otto.id, name: "Otto Brightwater" },
      isMine: false,
    });
    expect(row.decidedAt).not.toBeNull();
    // An admin sees the same list.
    expect((await list("", admin)).body.total).toBe(4);
  });

  it("filters by status, group, agent, member and dates", async () => {
    expect(idsOf((await list("&status=accepted")).body)).toEqual([ids.tetraAccepted, ids.coryAccepted].sort());
    expect(idsOf((await list("&group=corydoras")).body)).toEqual([ids.coryAccepted, ids.coryDeclined].sort());
    expect(idsOf((await list("&group=corydoras&status=accepted")).body)).toEqual([ids.coryAccepted]);
    expect((await list("&agent=hydrogen-peroxide")).body.total).toBe(4);
    expect((await list("&agent=salt")).body.total).toBe(0);
    expect(idsOf((await list("&member=brightwater")).body)).toEqual([ids.coryAccepted, ids.coryDeclined].sort());
    expect(idsOf((await list(`&member=${encodeURIComponent(wren.id)}`)).body)).toEqual(
      [ids.tetraAccepted, ids.tetraWaiting].sort(),
    );
    // A % typed in the member box matches a literal %, not everyone.
    expect((await list("&member=%25")).body.total).toBe(0);
    // Treatment start dates: 2026-09-20, 09-25, 10-01, 10-05; `to` is inclusive.
    expect(idsOf((await list("&dateOf=started&from=2026-09-25&to=2026-10-01")).body)).toEqual(
      [ids.coryDeclined, ids.tetraAccepted].sort(),
    );
    const today = new Date().toISOString().slice(0, 10);
    expect((await list(`&from=${today}&to=${today}`)).body.total).toBe(4);
    expect((await list("&dateOf=decided&from=2026-01-01")).body.total).toBe(3);
    expect((await list("&to=2026-01-01")).body.total).toBe(0);
  });

  it("sorts and pages on the server without repeating or skipping a report", async () => {
    const first = await list("&sort=concentration&dir=asc&pageSize=3&page=1");
    const second = await list("&sort=concentration&dir=asc&pageSize=3&page=2");
    expect(first.body).toMatchObject({ total: 4, page: 1, pageSize: 3 });
    expect(first.body.reports).toHaveLength(3);
    expect(second.body.reports).toHaveLength(1);
    const doses = [...first.body.reports, ...second.body.reports].map(
      (r: { concentration: number }) => r.concentration,
    );
    // 30, 40, 50, 60 mL of 3 % w/v (30 mg/mL) in 40 L: 22.5, 30, 37.5, 45 mg/L.
    expect(doses).toEqual([22.5, 30, 37.5, 45]);
    const desc = await list("&sort=member&dir=desc&pageSize=2");
    expect(desc.body.reports.map((r: { member: { name: string } }) => r.member.name)).toEqual([
      "Wren Appleby",
      "Wren Appleby",
    ]);
  });

  it("refuses members (403) and visitors (401), checks the role before the parameters, and answers 422 naming a bad one", async () => {
    const member = await list("", wren);
    expect(member.status).toBe(403);
    expect(member.body.error.code).toBe("forbidden");
    expect((await list("&status=nonsense", wren)).status).toBe(403);
    expect((await list("", null)).status).toBe(401);
    for (const [q, path] of [
      ["&status=draft", "status"],
      ["&pageSize=500", "pageSize"],
      ["&from=2026-02-30", "from"],
      ["&from=2026-10-02&to=2026-10-01", "to"],
      ["&species=x", "species"],
    ] as const) {
      const r = await list(q);
      expect(r.status, q).toBe(422);
      expect(
        r.body.error.issues.map((i: { path: string }) => i.path),
        q,
      ).toContain(path);
    }
    // scope=mine is unchanged: the caller's own reports, drafts included.
    const mine = await call(reportsRoute.GET, "/api/reports?scope=mine", { cookie: wren.cookie });
    expect(mine.status).toBe(200);
    expect(idsOf(mine.body)).toEqual([ids.tetraAccepted, ids.tetraWaiting, ids.draft].sort());
  });

  it("leads to an accepted report that a moderator can retract", async () => {
    const found = await list("&status=accepted&member=appleby");
    expect(found.body.reports).toHaveLength(1);
    const id = found.body.reports[0].id;
    expect((await decide(id, "retract", "Entered twice by mistake.")).body).toEqual({ id, status: "retracted" });
    expect(idsOf((await list("&status=retracted")).body)).toEqual([id]);
  });
});
