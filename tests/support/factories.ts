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
// Tests send invalid shapes on purpose and read nested fields back, so the body is loosely typed.
/* eslint-disable @typescript-eslint/no-explicit-any -- a deliberately loose request body, see above */
export function reportBody(over: Record<string, any> = {}): Record<string, any> {
  const base: Record<string, any> = {
    speciesId: "paracheirodon-innesi",
    fishCount: 6,
    sizeClass: "adult",
    conditionSlug: "white-spot",
    startedOn: "2026-11-02",
    water: { volume: 40, volumeUnit: "L", temperature: 25, temperatureUnit: "C", ph: 7.0, setting: "bare" },
    treatment: {
      agentSlug: "hydrogen-peroxide",
      stockPercent: 3,
      stockBasis: "w/v",
      amountMl: 40,
      doses: 3,
      intervalHours: 48,
    },
    outcome: {
      fishLost: 0,
      lossCause: null,
      distress: "mild",
      condition: "cleared",
      observedDaysAfter: 7,
      notes: "Test report.",
    },
    showName: false,
  };
  const out: Record<string, any> = { ...base };
  for (const [k, v] of Object.entries(over)) {
    out[k] =
      v && typeof v === "object" && !Array.isArray(v) && base[k] && typeof base[k] === "object"
        ? { ...base[k], ...v }
        : v;
  }
  return out;
}
/* eslint-enable @typescript-eslint/no-explicit-any */
