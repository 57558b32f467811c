import { describe, expect, it } from "vitest";
import { eq, inArray } from "drizzle-orm";
import * as authRoute from "@/app/api/auth/[...all]/route";
import * as memberRoute from "@/app/api/admin/members/[id]/route";
import { getDb, schema } from "@/db/client";
import { settleBackgroundMail } from "@/features/members/server";
import { call, cookieFrom } from "../support/http";
import { linkIn, mailTo, PASSWORD, signedInUser } from "../support/factories";

// RATE_LIMIT is off here (the test default): what is shown holds without the general limiter.

function signIn(email: string, password: string, headers: Record<string, string> = {}) {
  return call(authRoute.POST, "/api/auth/sign-in/email", { body: { email, password }, headers });
}

/** Every key path of a JSON value with its value's type, to compare the shape of two answers. */
function shape(v: unknown, prefix = ""): string[] {
  if (v === null) return [`${prefix}:null`];
  if (Array.isArray(v)) return [`${prefix}:array`];
  if (typeof v !== "object") return [`${prefix}:${typeof v}`];
  return Object.entries(v as Record<string, unknown>)
    .flatMap(([k, x]) => shape(x, prefix ? `${prefix}.${k}` : k))
    .sort();
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

async function timed<T>(f: () => Promise<T>): Promise<[T, number]> {
  const t0 = performance.now();
  const r = await f();
  return [r, performance.now() - t0];
}

describe("per-account limit on wrong passwords", () => {
  it("pauses an account's password sign-in after ten wrong passwords, whatever X-Forwarded-For says, and mails its owner once", async () => {
    const user = await signedInUser("member");
    const statuses: number[] = [];
    let last: Response | undefined;
    for (let i = 0; i < 15; i++) {
      const r = await signIn(user.email, `wrong-password-${i}`, { "x-forwarded-for": `203.0.113.${i + 1}` });
      statuses.push(r.status);
      last = r.res;
    }
    expect(statuses).toEqual([...Array(10).fill(401), ...Array(5).fill(429)]);
    expect(Number(last!.headers.get("retry-after"))).toBeGreaterThan(60);

    // The right password now waits too (upper case and another forwarded address change nothing).
    const right = await signIn(user.email.toUpperCase(), PASSWORD, { "x-forwarded-for": "198.51.100.99" });
    expect(right.status).toBe(429);
    expect(right.body.error.code).toBe("rate_limited");
    expect(right.body.error.message).toMatch(/paused/);

    await settleBackgroundMail();
    expect(
      mailTo(user.email).filter((m) => /Subject: Password sign-in to your Tanklore account is paused/.test(m)),
    ).toHaveLength(1);

    // Another account is not affected.
    const other = await signedInUser("member");
    expect((await signIn(other.email, PASSWORD)).status).toBe(200);
  });

  it("lifts the pause when the owner resets the password", async () => {
    const user = await signedInUser("member");
    for (let i = 0; i < 11; i++) await signIn(user.email, `wrong-password-${i}`);
    expect((await signIn(user.email, PASSWORD)).status).toBe(429);
    await call(authRoute.POST, "/api/auth/request-password-reset", {
      body: { email: user.email, redirectTo: "/reset-password" },
    });
    await settleBackgroundMail();
    const mail = mailTo(user.email).find((m) => /Subject: Choose a new Tanklore password/.test(m))!;
    const link = new URL(linkIn(mail));
    const hop = await call(authRoute.GET, link.pathname + link.search);
    const token = new URL(hop.res.headers.get("location")!, "http://localhost:3000").searchParams.get("token")!;
    expect(
      (await call(authRoute.POST, "/api/auth/reset-password", { body: { newPassword: "a-fresh-password-2", token } }))
        .status,
    ).toBe(200);
    expect((await signIn(user.email, "a-fresh-password-2")).status).toBe(200);
  });

  it("counts parallel guesses too", async () => {
    const user = await signedInUser("member");
    const results = await Promise.all(Array.from({ length: 14 }, (_, i) => signIn(user.email, `parallel-wrong-${i}`)));
    const statuses = results.map((r) => r.status);
    expect(statuses.filter((s) => s === 401)).toHaveLength(10);
    expect(statuses.filter((s) => s === 429)).toHaveLength(4);
  });

  it("forgives earlier misses once the right password is given", async () => {
    const user = await signedInUser("member");
    for (let i = 0; i < 9; i++) expect((await signIn(user.email, `typo-${i}`)).status).toBe(401);
    expect((await signIn(user.email, PASSWORD)).status).toBe(200);
    for (let i = 0; i < 9; i++) expect((await signIn(user.email, `typo-again-${i}`)).status).toBe(401);
    expect((await signIn(user.email, PASSWORD)).status).toBe(200);
  });
});

describe("body and field limits on the sign-in routes", () => {
  it("refuses a sign-up with a 1 MB name with 413 in the error envelope and stores nothing", async () => {
    const email = "huge-name@example.org";
    const r = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "n".repeat(1024 * 1024), email, password: "a-long-password-1" },
    });
    expect(r.status).toBe(413);
    expect(r.body).toEqual({ error: { code: "too_large", message: expect.stringMatching(/64 KB/) } });
    const db = await getDb();
    expect(await db.select().from(schema.users).where(eq(schema.users.email, email))).toEqual([]);
  });

  it("refuses a name over 100 characters and an address over 254 with 422 naming the field", async () => {
    const db = await getDb();
    const longName = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "N".repeat(101), email: "long-name@example.org", password: "a-long-password-1" },
    });
    expect(longName.status).toBe(422);
    expect(longName.body.error.issues).toEqual([{ path: "name", message: "Name is at most 100 characters." }]);
    const longEmail = `${"e".repeat(250)}@example.org`;
    const r = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "Elle", email: longEmail, password: "a-long-password-1" },
    });
    expect(r.status).toBe(422);
    expect(r.body.error.issues[0].path).toBe("email");
    const rows = await db
      .select()
      .from(schema.users)
      .where(inArray(schema.users.email, ["long-name@example.org", longEmail]));
    expect(rows).toEqual([]);

    // A name of exactly 100 characters is fine.
    const ok = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "N".repeat(100), email: "hundred@example.org", password: "a-long-password-1" },
    });
    expect(ok.status).toBe(200);
  });

  it("refuses an over-long name when a member renames themself", async () => {
    const user = await signedInUser("member");
    const r = await call(authRoute.POST, "/api/auth/update-user", {
      cookie: user.cookie,
      body: { name: "x".repeat(5000) },
    });
    expect(r.status).toBe(422);
    const db = await getDb();
    const [u] = await db.select().from(schema.users).where(eq(schema.users.id, user.id));
    expect(u!.name).toBe(user.name);
  });
});

describe("password reset", () => {
  it("ends the account's other sessions", async () => {
    const user = await signedInUser("member");
    const laptop = user.cookie;
    const phone = cookieFrom((await signIn(user.email, PASSWORD)).res);
    for (const cookie of [laptop, phone]) {
      expect((await call(authRoute.GET, "/api/auth/get-session", { cookie })).body?.user?.id).toBe(user.id);
    }

    await call(authRoute.POST, "/api/auth/request-password-reset", {
      body: { email: user.email, redirectTo: "/reset-password" },
    });
    await settleBackgroundMail();
    const mail = mailTo(user.email).find((m) => /Subject: Choose a new Tanklore password/.test(m))!;
    const hop = await call(authRoute.GET, new URL(linkIn(mail)).pathname + new URL(linkIn(mail)).search);
    const token = new URL(hop.res.headers.get("location")!, "http://localhost:3000").searchParams.get("token")!;
    const reset = await call(authRoute.POST, "/api/auth/reset-password", {
      body: { newPassword: "a-brand-new-password", token },
    });
    expect(reset.status).toBe(200);

    for (const cookie of [laptop, phone]) {
      const s = await call(authRoute.GET, "/api/auth/get-session", { cookie });
      expect(s.body).toBeNull();
    }
    const db = await getDb();
    expect(await db.select().from(schema.sessions).where(eq(schema.sessions.userId, user.id))).toEqual([]);
  });
});

describe("sign-up and forgot-password tell nothing about which addresses have accounts", () => {
  it("answers a sign-up for a taken address like a fresh one, and mails the owner instead", async () => {
    const owner = await signedInUser("member");
    const taken = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "Someone Else", email: owner.email, password: "another-password-1" },
    });
    const fresh = await call(authRoute.POST, "/api/auth/sign-up/email", {
      body: { name: "Someone Else", email: "fresh-address@example.org", password: "another-password-1" },
    });
    expect(taken.status).toBe(200);
    expect(fresh.status).toBe(200);
    expect(shape(taken.body)).toEqual(shape(fresh.body));
    expect(taken.body.user).toMatchObject({
      name: "Someone Else",
      email: owner.email,
      emailVerified: false,
      role: "member",
    });
    expect(taken.body.user.id).not.toBe(owner.id);

    await settleBackgroundMail();
    const ownerMail = mailTo(owner.email);
    expect(ownerMail.filter((m) => /Subject: Someone tried to join Tanklore with your address/.test(m))).toHaveLength(
      1,
    );
    expect(ownerMail.some((m) => /Subject: Confirm your e-mail address/.test(m))).toBe(false);
    // Nothing about the account changed.
    const db = await getDb();
    const [u] = await db.select().from(schema.users).where(eq(schema.users.id, owner.id));
    expect(u!.name).toBe(owner.name);
    expect((await signIn(owner.email, PASSWORD)).status).toBe(200);
  });

  it("answers alike and in about the same time whether or not the address has an account", async () => {
    const owner = await signedInUser("member");
    const known: number[] = [];
    const unknown: number[] = [];
    const bodies: unknown[] = [];
    // Interleaved, after one warm-up each, so load on the machine hits both alike.
    for (let i = 0; i < 8; i++) {
      const [a, ta] = await timed(() =>
        call(authRoute.POST, "/api/auth/request-password-reset", {
          body: { email: owner.email, redirectTo: "/reset-password" },
        }),
      );
      const [b, tb] = await timed(() =>
        call(authRoute.POST, "/api/auth/request-password-reset", {
          body: { email: `nobody-${i}@example.org`, redirectTo: "/reset-password" },
        }),
      );
      expect(a.status).toBe(200);
      expect(b.status).toBe(200);
      bodies.push(a.body, b.body);
      if (i > 0) {
        known.push(ta);
        unknown.push(tb);
      }
    }
    expect(new Set(bodies.map((b) => JSON.stringify(b))).size).toBe(1);
    // Within a factor of two (plus 20 ms for scheduling noise); before mail left the request path a
    // known address took about fifteen times as long.
    expect(median(known)).toBeLessThan(2 * median(unknown) + 20);

    const signUpKnown: number[] = [];
    const signUpUnknown: number[] = [];
    for (let i = 0; i < 6; i++) {
      const [, ta] = await timed(() =>
        call(authRoute.POST, "/api/auth/sign-up/email", {
          body: { name: "Tess Timing", email: owner.email, password: "a-long-password-1" },
        }),
      );
      const [, tb] = await timed(() =>
        call(authRoute.POST, "/api/auth/sign-up/email", {
          body: { name: "Tess Timing", email: `timing-${i}@example.org`, password: "a-long-password-1" },
        }),
      );
      if (i > 0) {
        signUpKnown.push(ta);
        signUpUnknown.push(tb);
      }
    }
    const [k, u] = [median(signUpKnown), median(signUpUnknown)];
    expect(k).toBeLessThan(2 * u + 20);
    expect(u).toBeLessThan(2 * k + 20);
    await settleBackgroundMail();
  });
});

describe("the club always keeps an admin, and every role change is recorded, by every route", () => {
  async function soleAdmin() {
    const db = await getDb();
    await db.update(schema.users).set({ role: "member" }).where(eq(schema.users.role, "admin"));
    return signedInUser("admin");
  }

  it("refuses the last admin's self-demotion through the sign-in library's set-role and through the members API", async () => {
    const admin = await soleAdmin();
    const viaLibrary = await call(authRoute.POST, "/api/auth/admin/set-role", {
      cookie: admin.cookie,
      body: { userId: admin.id, role: "member" },
    });
    expect(viaLibrary.status).toBe(409);
    expect(viaLibrary.body.error.code).toBe("conflict");
    const trailing = await call(authRoute.POST, "/api/auth/admin/set-role/", {
      cookie: admin.cookie,
      body: { userId: admin.id, role: "member" },
    });
    expect(trailing.status).toBe(409);
    const viaApi = await call(memberRoute.PATCH, `/api/admin/members/${admin.id}`, {
      method: "PATCH",
      cookie: admin.cookie,
      body: { role: "member" },
      params: { id: admin.id },
    });
    expect(viaApi.status).toBe(409);
    const db = await getDb();
    const [u] = await db.select().from(schema.users).where(eq(schema.users.id, admin.id));
    expect(u!.role).toBe("admin");
    expect(await db.select().from(schema.roleChanges).where(eq(schema.roleChanges.userId, admin.id))).toEqual([]);
  });

  it("records a role change made through set-role in role_changes, and lets only admins make it", async () => {
    const admin = await soleAdmin();
    const target = await signedInUser("member");
    const byMember = await call(authRoute.POST, "/api/auth/admin/set-role", {
      cookie: target.cookie,
      body: { userId: target.id, role: "admin" },
    });
    expect(byMember.status).toBe(403);
    const byVisitor = await call(authRoute.POST, "/api/auth/admin/set-role", {
      body: { userId: target.id, role: "admin" },
    });
    expect(byVisitor.status).toBe(401);
    const badRole = await call(authRoute.POST, "/api/auth/admin/set-role", {
      cookie: admin.cookie,
      body: { userId: target.id, role: ["admin", "member"] },
    });
    expect(badRole.status).toBe(422);

    const ok = await call(authRoute.POST, "/api/auth/admin/set-role", {
      cookie: admin.cookie,
      body: { userId: target.id, role: "moderator" },
    });
    expect(ok.status).toBe(200);
    expect(ok.body.user).toMatchObject({ id: target.id, role: "moderator" });
    const db = await getDb();
    const changes = await db.select().from(schema.roleChanges).where(eq(schema.roleChanges.userId, target.id));
    expect(changes).toMatchObject([{ actorId: admin.id, fromRole: "member", toRole: "moderator" }]);
  });

  it("keeps the library's other admin routes closed, however the path is spelled, and changes nothing", async () => {
    const admin = await soleAdmin();
    const target = await signedInUser("member");
    const attempts: [string, unknown][] = [
      ["/api/auth/admin/ban-user", { userId: target.id }],
      ["/api/auth/admin/remove-user", { userId: admin.id }],
      ["/api/auth/admin/update-user", { userId: target.id, data: { role: "admin" } }],
      [
        "/api/auth/admin/create-user",
        { email: "made@example.org", password: "a-long-password-1", name: "Made", role: "admin" },
      ],
      ["/api/auth/admin/set-user-password", { userId: target.id, newPassword: "taken-over-password" }],
      ["/api/auth/admin/impersonate-user", { userId: target.id }],
      ["/api/auth/Admin/ban-user", { userId: target.id }],
      ["/api/auth/admin//ban-user", { userId: target.id }],
      ["/api/auth/admin/%62an-user", { userId: target.id }],
    ];
    for (const [path, body] of attempts) {
      const r = await call(authRoute.POST, path, { cookie: admin.cookie, body });
      expect(r.status, path).toBe(404);
    }
    const list = await call(authRoute.GET, "/api/auth/admin/list-users", { cookie: admin.cookie });
    expect(list.status).toBe(404);
    // A member's own profile route cannot carry a role either.
    const selfPromote = await call(authRoute.POST, "/api/auth/update-user", {
      cookie: target.cookie,
      body: { role: "admin" },
    });
    expect(selfPromote.status).toBeGreaterThanOrEqual(400);
    expect(selfPromote.status).toBeLessThan(500);

    const db = await getDb();
    const rows = await db
      .select()
      .from(schema.users)
      .where(inArray(schema.users.id, [admin.id, target.id]));
    expect(rows.map((r) => [r.id, r.role, r.banned ?? false]).sort()).toEqual(
      [
        [admin.id, "admin", false],
        [target.id, "member", false],
      ].sort(),
    );
    expect(await db.select().from(schema.users).where(eq(schema.users.email, "made@example.org"))).toEqual([]);
    expect((await signIn(target.email, PASSWORD)).status).toBe(200);
    const admins = await db.select().from(schema.users).where(eq(schema.users.role, "admin"));
    expect(admins.map((u) => u.id)).toEqual([admin.id]);
  });
});
