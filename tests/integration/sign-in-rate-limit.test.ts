import { describe, expect, it } from "vitest";
import * as authRoute from "@/app/api/auth/[...all]/route";
import { call } from "../support/http";
import { signedInUser } from "../support/factories";

// The limiter is on in production; this file turns it on (auth is created lazily, after this line).
process.env.RATE_LIMIT = "on";

describe("sign-in rate limit", () => {
  it("answers 429 with a retry hint from the eleventh attempt within a minute from one address", async () => {
    const user = await signedInUser("member"); // one sign-in from no address
    const headers = { "x-forwarded-for": "198.51.100.7" };
    const statuses: number[] = [];
    let last: Response | undefined;
    for (let i = 0; i < 12; i++) {
      const r = await call(authRoute.POST, "/api/auth/sign-in/email", { body: { email: user.email, password: "wrong-password-x" }, headers });
      statuses.push(r.status);
      last = r.res;
    }
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(401));
    expect(statuses.slice(10)).toEqual([429, 429]);
    expect(Number(last!.headers.get("x-retry-after"))).toBeGreaterThan(0);

    // Another address is not held back by the first one's attempts.
    const other = await call(authRoute.POST, "/api/auth/sign-in/email", {
      body: { email: user.email, password: "correct-horse-battery" },
      headers: { "x-forwarded-for": "198.51.100.8" },
    });
    expect(other.status).toBe(200);
  });
});
