import "server-only";
import { and, eq, gt, inArray, isNull, lt, lte, or } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { publicBaseUrl } from "@/features/shared/env";
import { sendMail } from "@/features/mail/server";
import { registerJob } from "@/features/shared/server/jobs";

const { users, reports, moderatorDigests } = schema;
const HOUR = 3600_000;
const CLAIM_MS = 5 * 60_000;

/**
 * Mails each moderator a digest of reports submitted since their last one, at most one mail per
 * moderator per hour. Each moderator's digest is claimed first (one conditional update that only one
 * process can win, held for a few minutes), then sent, then marked sent; a failed send releases the claim
 * unmarked, so the next round tries again. Returns how many digests went out; throws after the round
 * when any send failed (the job runner records it and retries).
 */
export async function sendModeratorDigests(now = new Date()): Promise<number> {
  const db = await getDb();
  const mods = await db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(inArray(users.role, ["moderator", "admin"]));
  let sent = 0;
  const failures: unknown[] = [];
  for (const m of mods) {
    // "Never sent" is a row sent at the epoch, so the claim below is one update for everyone.
    await db
      .insert(moderatorDigests)
      .values({ userId: m.id, lastSentAt: new Date(0), coveredUntil: new Date(0) })
      .onConflictDoNothing();
    const [claimed] = await db
      .update(moderatorDigests)
      .set({ claimedUntil: new Date(now.getTime() + CLAIM_MS) })
      .where(
        and(
          eq(moderatorDigests.userId, m.id),
          lte(moderatorDigests.lastSentAt, new Date(now.getTime() - HOUR)),
          or(isNull(moderatorDigests.claimedUntil), lt(moderatorDigests.claimedUntil, now)),
        ),
      )
      .returning({ coveredUntil: moderatorDigests.coveredUntil });
    if (!claimed) continue;
    const release = (set: Partial<typeof moderatorDigests.$inferInsert> = {}) =>
      db
        .update(moderatorDigests)
        .set({ ...set, claimedUntil: null })
        .where(eq(moderatorDigests.userId, m.id));
    try {
      const fresh = await db
        .select({ id: reports.id, authorId: reports.authorId, submittedAt: reports.submittedAt })
        .from(reports)
        .where(and(eq(reports.status, "awaiting_review"), gt(reports.submittedAt, claimed.coveredUntil)));
      const forThem = fresh.filter((r) => r.authorId !== m.id);
      if (!forThem.length) {
        await release();
        continue;
      }
      await sendMail({
        to: m.email,
        subject: `Tanklore: ${forThem.length} new report${forThem.length === 1 ? "" : "s"} awaiting review`,
        text: `Hello ${m.name},\n\n${forThem.length} report${forThem.length === 1 ? " has" : "s have"} been submitted since your last digest and await review:\n\n${forThem.map((r) => `  ${publicBaseUrl()}/review/${r.id}`).join("\n")}\n\nThe queue: ${publicBaseUrl()}/review\n\nYou get at most one of these an hour.\n— Tanklore`,
      });
      await release({ lastSentAt: now, coveredUntil: now });
      sent += 1;
    } catch (err) {
      failures.push(err);
      await release().catch(() => undefined);
    }
  }
  if (failures.length)
    throw new Error(
      `${failures.length} moderator digest(s) could not be sent; they stay unsent and the next round tries again.`,
      { cause: failures[0] },
    );
  return sent;
}

/** The digest round runs every five minutes in whichever process claims it (features/shared/server/jobs.ts). */
registerJob("moderator-digest", {
  everyMs: 5 * 60_000,
  run: async (_payload, { now }) => {
    await sendModeratorDigests(now);
  },
});

/** Kept for callers of the old per-process timer: the job runner now runs the round. */
export function startDigestScheduler(): void {}
