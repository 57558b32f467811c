import fs from "node:fs";
import path from "node:path";
import { hashPassword } from "better-auth/crypto";
import { getDb, schema } from "@/db/client";
import { mailDir } from "@/features/mail/server";
import type { Role } from "@/features/shared/roles";
import * as authRoute from "@/app/api/auth/[...all]/route";
import { call, cookieFrom } from "./http";

export const PASSWORD = "correct-horse-battery";
let n = 0;

/** Inserts a verified account with a role, and signs it in; returns its id and cookie. */
export async function signedInUser(role: Role = "member", name?: string) {
  const db = await getDb();
  n += 1;
  const id = `test-${role}-${n}-${Math.random().toString(36).slice(2, 8)}`;
  const email = `${id}@example.org`;
  await db.insert(schema.users).values({ id, name: name ?? `Test ${role} ${n}`, email, emailVerified: true, role });
  await db.insert(schema.accounts).values({
    id: `acct-${id}`,
    accountId: id,
    providerId: "credential",
    userId: id,
    password: await hashPassword(PASSWORD),
  });
  const cookie = await signIn(email, PASSWORD);
  return { id, email, cookie, name: name ?? `Test ${role} ${n}` };
}

export async function signIn(email: string, password: string): Promise<string> {
  const r = await call(authRoute.POST, "/api/auth/sign-in/email", { body: { email, password } });
  if (r.status !== 200) throw new Error(`sign-in failed: ${r.status} ${JSON.stringify(r.body)}`);
  return cookieFrom(r.res);
}

/** Messages in the mail catcher addressed to `to`, oldest first, as raw text. */
export function mailTo(to: string): string[] {
  const dir = mailDir();
  if (!fs.existsSync(dir)) return [];
  return (
    fs
      .readdirSync(dir)
      .filter((f) => f.endsWith(".eml"))
      .sort()
      // Undo quoted-printable soft line breaks so a test can match whole sentences.
      .map((f) =>
        fs
          .readFileSync(path.join(dir, f), "utf8")
          .replace(/=\r?\n/g, "")
          .replace(/=3D/g, "="),
      )
      .filter((m) => new RegExp(`^To: .*${to.replace(/[.+]/g, "\\$&")}`, "mi").test(m))
  );
}

/** The first http link in a message, with quoted-printable soft breaks undone. */
export function linkIn(message: string): string {
  const body = message.replace(/=\r?\n/g, "").replace(/=3D/g, "=");
  const m = body.match(/https?:\/\/[^\s<>"]+/);
  if (!m) throw new Error("no link in message");
  return m[0];
}

/** A complete, valid report body (api.md), with overrides merged one level deep. */
export { reportBody } from "./report-body";
