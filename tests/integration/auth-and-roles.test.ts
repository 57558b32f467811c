import { describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import * as authRoute from "@/app/api/auth/[...all]/route";
import * as membersRoute from "@/app/api/admin/members/route";
import * as memberRoute from "@/app/api/admin/members/[id]/route";
import * as healthRoute from "@/app/api/health/route";
import { getDb, schema } from "@/db/client";
import { settleBackgroundMail } from "@/features/members/server";
import { call, cookieFrom } from "../support/http";
import { linkIn, mailTo, signedInUser } from "../support/factories";

describe("sign-up, verification and sign-in", () => {
  it("sends a verification mail to the catcher whose link confirms the address and lets the member sign in", async () => {
    const email = "newcomer@example.org";
    const signUp = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "Nell Newcomer", email, password: "a-long-password-1" },
    });
    expect(signUp.status).toBe(200);

    // Before confirming, sign-in is refused with a 403 that says to verify.
    const early = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email, password: "a-long-password-1" },
    });
    expect(early.status).toBe(403);

    await settleBackgroundMail(); // mail goes out after the answer
    const mails = mailTo(email);
    expect(mails.length).toBeGreaterThanOrEqual(1);
    expect(mails[0]).toMatch(/Subject: Confirm your e-mail address/);
    const link = new URL(linkIn(mails[0]!));
    expect(link.pathname).toBe("/api/auth/verify-email");

    const verify = await call(authRoute.GET, `${link.pathname}${link.search}`);
    expect([200, 302]).toContain(verify.status);
    const db = await getDb();
    const [u] = await db.select().from(schema.users).where(eq(schema.users.email, email));
    expect(u?.emailVerified).toBe(true);
    expect(u?.role).toBe("member");

    const signIn = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email, password: "a-long-password-1" },
    });
    expect(signIn.status).toBe(200);
    const session = await call(authRoute.GET, "/api/auth/get-session", { cookie: cookieFrom(signIn.res) });
    expect(session.body.user.name).toBe("Nell Newcomer");
  });

  it("resets a forgotten password through the link in the reset mail", async () => {
    const user = await signedInUser("member");
    const ask = await call(authRoute.POST, "/api/auth/request-password-reset", {
      body: { email: user.email, redirectTo: "/reset-password" },
    });
    expect(ask.status).toBe(200);
    await settleBackgroundMail();
    const mail = mailTo(user.email).find((m) => /Subject: Choose a new Tanklore password/.test(m));
    expect(mail).toBeDefined();
    const link = new URL(linkIn(mail!));
    // The link leads through better-auth to our page with the token.
    const hop = await call(authRoute.GET, `${link.pathname}${link.search}`);
    expect(hop.status).toBe(302);
    const landing = new URL(hop.res.headers.get("location")!, "http://localhost:3000");
    expect(landing.pathname).toBe("/reset-password");
    const token = landing.searchParams.get("token")!;
    const reset = await call(authRoute.POST, "/api/auth/reset-password", {
      body: { newPassword: "a-brand-new-password", token },
    });
    expect(reset.status).toBe(200);
    const old = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email: user.email, password: "correct-horse-battery" },
    });
    expect(old.status).toBe(401);
    const fresh = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email: user.email, password: "a-brand-new-password" },
    });
    expect(fresh.status).toBe(200);
  });
});

describe("role gating on admin routes", () => {
  it("answers a visitor 401 and a member 403 with the error envelope", async () => {
    const visitor = await call(membersRoute.GET, "/api/admin/members");
    expect(visitor.status).toBe(401);
    expect(visitor.body).toEqual({ error: { code: "unauthenticated", message: expect.any(String) } });

    const member = await signedInUser("member");
    const refused = await call(membersRoute.GET, "/api/admin/members", { cookie: member.cookie });
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe("forbidden");
    expect(refused.body.error.message).toMatch(/role/);

    const patch = await call(memberRoute.PATCH, `/api/admin/members/${member.id}`, {
      method: "PATCH",
      cookie: member.cookie,
      body: { role: "admin" },
      params: { id: member.id },
    });
    expect(patch.status).toBe(403);

    const moderator = await signedInUser("moderator");
    const modRefused = await call(membersRoute.GET, "/api/admin/members", { cookie: moderator.cookie });
    expect(modRefused.status).toBe(403);
  });

  it("lets an admin list, filter, sort and page members and change a role, recording the change", async () => {
    const admin = await signedInUser("admin", "Alma Admin");
    const target = await signedInUser("member", "Zed Target");
    const list = await call(membersRoute.GET, "/api/admin/members?sort=name&dir=desc&pageSize=1", {
      cookie: admin.cookie,
    });
    expect(list.status).toBe(200);
    expect(list.body.members).toHaveLength(1);
    expect(list.body.members[0].name).toBe("Zed Target");
    expect(list.body.total).toBeGreaterThanOrEqual(2);

    const filtered = await call(membersRoute.GET, "/api/admin/members?q=alma", { cookie: admin.cookie });
    expect(filtered.body.members.map((m: { name: string }) => m.name)).toEqual(["Alma Admin"]);

    const bad = await call(membersRoute.GET, "/api/admin/members?pageSize=1000&role=owner", { cookie: admin.cookie });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(["pageSize", "role"]);

    const badRole = await call(memberRoute.PATCH, `/api/admin/members/${target.id}`, {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "owner" },
      params: { id: target.id },
    });
    expect(badRole.status).toBe(422);
    expect(badRole.body.error.issues[0].path).toBe("role");

    const ok = await call(memberRoute.PATCH, `/api/admin/members/${target.id}`, {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "moderator" },
      params: { id: target.id },
    });
    expect(ok.status).toBe(200);
    expect(ok.body.member.role).toBe("moderator");

    const db = await getDb();
    const changes = await db.select().from(schema.roleChanges).where(eq(schema.roleChanges.userId, target.id));
    expect(changes).toMatchObject([{ actorId: admin.id, fromRole: "member", toRole: "moderator" }]);

    const missing = await call(memberRoute.PATCH, "/api/admin/members/nobody", {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "member" },
      params: { id: "nobody" },
    });
    expect(missing.status).toBe(404);
  });

  it("refuses to demote the club's only admin and changes nothing", async () => {
    const db = await getDb();
    await db.update(schema.users).set({ role: "member" }).where(eq(schema.users.role, "admin"));
    const admin = await signedInUser("admin");
    const r = await call(memberRoute.PATCH, `/api/admin/members/${admin.id}`, {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "member" },
      params: { id: admin.id },
    });
    expect(r.status).toBe(409);
    const [u] = await db.select().from(schema.users).where(eq(schema.users.id, admin.id));
    expect(u?.role).toBe("admin");
  });

  it("refuses a cross-site request that would change data", async () => {
    const admin = await signedInUser("admin");
    const r = await call(memberRoute.PATCH, `/api/admin/members/${admin.id}`, {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "member" },
      params: { id: admin.id },
      headers: { origin: "https://elsewhere.example.net" },
    });
    expect(r.status).toBe(403);
  });
});

describe("health", () => {
  it("reports the embedded database", async () => {
    const r = await call(healthRoute.GET, "/api/health");
    expect(r).toMatchObject({ status: 200, body: { status: "ok", database: "pglite" } });
  });
});
