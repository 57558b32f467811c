import "server-only";
import fs from "node:fs";
import path from "node:path";
import crypto from "node:crypto";
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { admin as adminPlugin } from "better-auth/plugins";
import { nextCookies } from "better-auth/next-js";
import { APIError } from "better-auth/api";
import { getDb, schema } from "@/db/client";
import { dataDir, getEnv, publicBaseUrl } from "@/features/shared/env";
import { resetMail, signUpAttemptMail, verificationMail } from "@/features/mail/server";
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from "../schemas";
import { ac, admin, member, moderator } from "./access";
import { sendMailLater } from "./background-mail";
import { CLIENT_ADDRESS_HEADER } from "./client-address";
import { clearSignInAttempts } from "./sign-in-guard";

/**
 * The admin plugin's own routes. All are closed: roles change only through the app's
 * changeMemberRole (PATCH /api/admin/members/:id, or /api/auth/admin/set-role, which the route
 * handler sends there), which keeps one admin and records the change; bans, impersonation, password
 * setting and removal have no place in the app.
 */
export const closedAdminPaths = [
  "/admin/set-role",
  "/admin/get-user",
  "/admin/create-user",
  "/admin/update-user",
  "/admin/list-users",
  "/admin/list-user-sessions",
  "/admin/unban-user",
  "/admin/ban-user",
  "/admin/impersonate-user",
  "/admin/stop-impersonating",
  "/admin/revoke-user-session",
  "/admin/revoke-user-sessions",
  "/admin/remove-user",
  "/admin/set-user-password",
  "/admin/has-permission",
];

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
      // The same limits as the forms' schemas.
      minPasswordLength: PASSWORD_MIN_LENGTH,
      maxPasswordLength: PASSWORD_MAX_LENGTH,
      // Mail goes out after the answer, so a known address answers as fast as an unknown one.
      async sendResetPassword({ user, url }) {
        sendMailLater(resetMail(user.email, user.name, url));
      },
      // A reset is what someone does when they fear another has the password: sign out everywhere.
      revokeSessionsOnPasswordReset: true,
      // A reset proves the mailbox: it lifts a pause on password sign-in (the pause message says so).
      async onPasswordReset({ user }) {
        await clearSignInAttempts(user.email);
      },
      // Sign-up with a known address answers like a fresh one; the owner hears of it instead.
      async onExistingUserSignUp({ user }) {
        sendMailLater(
          signUpAttemptMail(user.email, user.name, `${publicBaseUrl()}/sign-in`, `${publicBaseUrl()}/forgot-password`),
        );
      },
      customSyntheticUser: ({ coreFields, additionalFields, id }) => ({
        ...coreFields,
        role: "member",
        banned: false,
        banReason: null,
        banExpires: null,
        isDemo: false,
        ...additionalFields,
        id,
      }),
    },
    emailVerification: {
      sendOnSignUp: true,
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      async sendVerificationEmail({ user, url }) {
        sendMailLater(verificationMail(user.email, user.name, url));
      },
    },
    user: {
      additionalFields: { isDemo: { type: "boolean", defaultValue: false, input: false } },
    },
    disabledPaths: closedAdminPaths,
    databaseHooks: {
      user: {
        update: {
          // Defence in depth behind the closed routes: better-auth never changes a role or bans;
          // the app's changeMemberRole (which writes directly) is the one place that does.
          async before(data) {
            if ("role" in data || data.banned === true) {
              throw new APIError("FORBIDDEN", {
                message: "Roles change only on the members page.",
                code: "ROLE_CHANGE_CLOSED",
              });
            }
          },
        },
      },
    },
    advanced: {
      // The address resolved by the route handler from TRUSTED_PROXY_HOPS; never a client's own header.
      ipAddress: { ipAddressHeaders: [CLIENT_ADDRESS_HEADER] },
    },
    rateLimit: {
      enabled: rateLimitOn,
      // In the database, so limits hold across restarts and between processes.
      storage: "database",
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
