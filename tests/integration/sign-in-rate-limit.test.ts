import { afterEach, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import * as authRoute from "@/app/api/auth/[...all]/route";
import { getDb } from "@/db/client";
import { resetAuthForTests } from "@/features/members/server/auth";
import { call } from "../support/http";
import { signedInUser } from "../support/factories";

// The limiter is on in production; this file turns it on (auth is created lazily, after this line).
process.env.RATE_LIMIT = "on";

// Wrong passwords for addresses that have no account: each address is tried once, so only the
// per-address limit (10 a minute on /sign-in/email) can answer 429, never the per-account one.
let seq = 0;
function wrongSignIn(headers: Record<string, string> = {}) {
  seq += 1;
  return call(authRoute.POST, "/api/auth/sign-in/email", {
    body: { email: `nobody-${seq}@example.org`, password: "wrong-password-x" },
    headers,
  });
}

afterEach(() => {
  delete process.env.TRUSTED_PROXY_HOPS;
  delete process.env.TANKLORE_PEER_HEADER;
});

describe("sign-in rate limit per client address", () => {
  it("honours X-Forwarded-For with one trusted proxy: the eleventh attempt from one address answers 429 with a retry hint", async () => {
    process.env.TRUSTED_PROXY_HOPS = "1";
    const user = await signedInUser("member");
    const headers = { "x-forwarded-for": "198.51.100.7" };
    const statuses: number[] = [];
    let last: Response | undefined;
    for (let i = 0; i < 12; i++) {
      const r = await wrongSignIn(headers);
      statuses.push(r.status);
      last = r.res;
    }
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(401));
    expect(statuses.slice(10)).toEqual([429, 429]);
    expect(Number(last!.headers.get("x-retry-after"))).toBeGreaterThan(0);

    // The proxy appends the address it saw; what the client wrote to the left of it is ignored.
    const spoofed = await wrongSignIn({ "x-forwarded-for": "203.0.113.50, 198.51.100.7" });
    expect(spoofed.status).toBe(429);

    // Another address is not held back by the first one's attempts.
    const other = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email: user.email, password: "correct-horse-battery" },
      headers: { "x-forwarded-for": "198.51.100.8" },
    });
    expect(other.status).toBe(200);
  });

  it("ignores a client's X-Forwarded-For by default: rotating it does not open a new bucket", async () => {
    // TRUSTED_PROXY_HOPS unset (0) and no socket address stamped: every request shares one bucket.
    const statuses: number[] = [];
    for (let i = 0; i < 12; i++) statuses.push((await wrongSignIn({ "x-forwarded-for": `192.0.2.${i + 1}` })).status);
    expect(statuses.slice(0, 10).every((s) => s === 401 || s === 429)).toBe(true);
    expect(statuses.slice(10)).toEqual([429, 429]);
    expect(statuses.filter((s) => s === 401).length).toBeLessThanOrEqual(10);
  });

  it("keys on the socket address stamped by Tanklore's server, whatever X-Forwarded-For says", async () => {
    process.env.TANKLORE_PEER_HEADER = "on";
    const statuses: number[] = [];
    for (let i = 0; i < 11; i++) {
      statuses.push(
        (await wrongSignIn({ "x-tanklore-peer-address": "198.51.100.20", "x-forwarded-for": `192.0.2.${100 + i}` }))
          .status,
      );
    }
    expect(statuses).toEqual([...Array(10).fill(401), 429]);
    // A different socket address has its own bucket.
    expect((await wrongSignIn({ "x-tanklore-peer-address": "198.51.100.21" })).status).toBe(401);
  });

  it("keeps the counts in the database, so a restarted server still refuses", async () => {
    process.env.TRUSTED_PROXY_HOPS = "1";
    const headers = { "x-forwarded-for": "198.51.100.30" };
    for (let i = 0; i < 10; i++) expect((await wrongSignIn(headers)).status).toBe(401);
    const db = await getDb();
    const rows = await db.execute(sql`select count(*)::int as n from rate_limits where key like '198.51.100.30|%'`);
    expect((rows as unknown as { rows: { n: number }[] }).rows[0]!.n).toBe(1);

    resetAuthForTests(); // a new better-auth instance, as after a restart or in a second process
    expect((await wrongSignIn(headers)).status).toBe(429);
  });
});
