import "server-only";
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { admin as adminPlugin } from "better-auth/plugins";
import { nextCookies } from "better-auth/next-js";
import { getDb, schema } from "@/db/client";
import { dataDir, getEnv, publicBaseUrl } from "@/features/shared/env";
import { resetMail, sendMail, verificationMail } from "@/features/mail/server";
import { ac, admin, member, moderator } from "./access";

/** The session secret: BETTER_AUTH_SECRET, or one generated once and kept in the data directory. */
export function authSecret(): string {
  const env = getEnv();
  if (env.BETTER_AUTH_SECRET) return env.BETTER_AUTH_SECRET;
  const file = path.join(dataDir(), "auth-secret");
  if (fs.existsSync(file)) return fs.readFileSync(file, "utf8").trim();
  fs.mkdirSync(dataDir(), { recursive: true });
  const secret = crypto.randomBytes(32).toString("base64url");
  fs.writeFileSync(file, secret, { mode: 0o600, flag: "wx" });
  return secret;
}

async function createAuth() {
  const db = await getDb();
  const env = getEnv();
  const rateLimitOn = env.RATE_LIMIT ? env.RATE_LIMIT === "on" : env.NODE_ENV === "production";
  return betterAuth({
    appName: "Tanklore",
    baseURL: publicBaseUrl(),
    // The same server is reached as localhost and 127.0.0.1 on one machine.
    trustedOrigins: [publicBaseUrl(), `http://localhost:${env.PORT}`, `http://127.0.0.1:${env.PORT}`],
    secret: authSecret(),
    database: drizzleAdapter(db, { provider: "pg", schema, usePlural: true }),
    emailAndPassword: {
      enabled: true,
      requireEmailVerification: true,
      minPasswordLength: 10,
      async sendResetPassword({ user, url }) {
        await sendMail(resetMail(user.email, user.name, url));
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      async sendVerificationEmail({ user, url }) {
        await sendMail(verificationMail(user.email, user.name, url));
      },
    },
    user: {
      additionalFields: { isDemo: { type: "boolean", defaultValue: false, input: false } },
    },
    rateLimit: {
      enabled: rateLimitOn,
      window: 60,
      max: 100,
      customRules: {
        // Ten attempts a minute per address: enough for a household or club room sharing one address, too few to guess passwords.
        "/sign-in/email": { window: 60, max: 10 },
        "/sign-up/email": { window: 60, max: 5 },
        "/request-password-reset": { window: 60, max: 3 },
      },
    },
    session: { cookieCache: { enabled: false } },
    plugins: [
      adminPlugin({ ac, roles: { member, moderator, admin }, defaultRole: "member", adminRoles: ["admin"] }),
      nextCookies(),
    ],
  });
}

export type Auth = Awaited<ReturnType<typeof createAuth>>;

const store = globalThis as unknown as { __tankloreAuth?: Promise<Auth> };

/** better-auth, created on first use (it needs the database, which opens lazily). */
export function getAuth(): Promise<Auth> {
  if (!store.__tankloreAuth) {
    store.__tankloreAuth = createAuth().catch((err) => {
      store.__tankloreAuth = undefined;
      throw err;
    });
  }
  return store.__tankloreAuth;
}

export function resetAuthForTests(): void {
  store.__tankloreAuth = undefined;
}
