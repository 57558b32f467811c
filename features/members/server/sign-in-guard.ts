import "server-only";
import { eq, and, lt, or, isNull } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { signInLockedMail } from "@/features/mail/server";
import { publicBaseUrl } from "@/features/shared/env";
import { sendMailLater } from "./background-mail";

const { signInLimits, users } = schema;

/**
 * The per-account limit on password sign-in: a security rule, always on (RATE_LIMIT does not turn it
 * off), keyed on the e-mail address typed, so no header or address change resets it.
 */
export const SIGN_IN_LIMIT = { attempts: 10, windowMinutes: 15, pauseMinutes: 15 } as const;

export type SignInCheck = { allowed: true } | { allowed: false; retryAfter: number };

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

/**
 * Counts one password attempt for `email` before the password is checked, so parallel guesses are
 * counted too; a right password clears the count (clearSignInAttempts). The attempt after the
 * tenth within the window pauses the account's password sign-in, and its owner gets one e-mail.
 */
export async function countSignInAttempt(rawEmail: string, now = new Date()): Promise<SignInCheck> {
  const email = normaliseEmail(rawEmail);
  const windowMs = SIGN_IN_LIMIT.windowMinutes * 60_000;
  const db = await getDb();
  const result = await db.transaction(async (tx) => {
    await tx.insert(signInLimits).values({ email, attempts: 0, windowStartedAt: now }).onConflictDoNothing();
    const [row] = await tx.select().from(signInLimits).where(eq(signInLimits.email, email)).for("update");
    if (!row) return { allowed: true as const, newlyLocked: false };
    if (row.lockedUntil && row.lockedUntil > now) {
      return { allowed: false as const, retryAfter: secondsUntil(row.lockedUntil, now), newlyLocked: false };
    }
    const fresh = now.getTime() - row.windowStartedAt.getTime() >= windowMs || row.lockedUntil !== null;
    const attempts = fresh ? 1 : row.attempts + 1;
    const windowStartedAt = fresh ? now : row.windowStartedAt;
    if (attempts > SIGN_IN_LIMIT.attempts) {
      const lockedUntil = new Date(now.getTime() + SIGN_IN_LIMIT.pauseMinutes * 60_000);
      await tx
        .update(signInLimits)
        .set({ attempts, windowStartedAt, lockedUntil })
        .where(eq(signInLimits.email, email));
      return { allowed: false as const, retryAfter: secondsUntil(lockedUntil, now), newlyLocked: true };
    }
    await tx
      .update(signInLimits)
      .set({ attempts, windowStartedAt, lockedUntil: null })
      .where(eq(signInLimits.email, email));
    return { allowed: true as const, newlyLocked: false };
  });
  if (result.newlyLocked) await tellOwner(email);
  if (Math.random() < 0.02) await pruneSignInLimits(now);
  return result.allowed ? { allowed: true } : { allowed: false, retryAfter: result.retryAfter };
}

/** A right password (or an unverified account's right password) forgives the earlier misses. */
export async function clearSignInAttempts(rawEmail: string): Promise<void> {
  const db = await getDb();
  await db.delete(signInLimits).where(eq(signInLimits.email, normaliseEmail(rawEmail)));
}

function secondsUntil(t: Date, now: Date): number {
  return Math.max(1, Math.ceil((t.getTime() - now.getTime()) / 1000));
}

async function tellOwner(email: string): Promise<void> {
  const db = await getDb();
  const [owner] = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .where(eq(users.email, email))
    .limit(1);
  if (!owner) return; // Guesses at an address with no account: nobody to tell.
  sendMailLater(
    signInLockedMail(owner.email, owner.name, SIGN_IN_LIMIT.pauseMinutes, `${publicBaseUrl()}/forgot-password`),
  );
}

/** Rows for addresses whose window and pause are over (guesses at random addresses would otherwise pile up). */
async function pruneSignInLimits(now: Date): Promise<void> {
  const db = await getDb();
  const cutoff = new Date(now.getTime() - SIGN_IN_LIMIT.windowMinutes * 60_000);
  await db
    .delete(signInLimits)
    .where(
      and(
        lt(signInLimits.windowStartedAt, cutoff),
        or(isNull(signInLimits.lockedUntil), lt(signInLimits.lockedUntil, now)),
      ),
    );
}
