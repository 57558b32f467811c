import "server-only";
import { and, eq, gt, inArray } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { publicBaseUrl } from "@/features/shared/env";
import { sendMail } from "@/features/mail/server";

const { users, reports, moderatorDigests } = schema;
const HOUR = 3600_000;

/**
 * Mails each moderator a digest of reports submitted since their last one, at most one mail per
 * moderator per hour. Returns how many digests went out.
 */
export async function sendModeratorDigests(now = new Date()): Promise<number> {
  const db = await getDb();
  const mods = await db.select({ id: users.id, email: users.email, name: users.name }).from(users).where(inArray(users.role, ["moderator", "admin"]));
  let sent = 0;
  for (const m of mods) {
    const [last] = await db.select().from(moderatorDigests).where(eq(moderatorDigests.userId, m.id));
    if (last && now.getTime() - last.lastSentAt.getTime() < HOUR) continue;
    const since = last?.coveredUntil ?? new Date(0);
    const fresh = await db
      .select({ id: reports.id, authorId: reports.authorId, submittedAt: reports.submittedAt })
      .from(reports)
      .where(and(eq(reports.status, "awaiting_review"), gt(reports.submittedAt, since)));
    const forThem = fresh.filter((r) => r.authorId !== m.id);
    if (!forThem.length) continue;
    await db
      .insert(moderatorDigests)
      .values({ userId: m.id, lastSentAt: now, coveredUntil: now })
      .onConflictDoUpdate({ target: moderatorDigests.userId, set: { lastSentAt: now, coveredUntil: now } });
    await sendMail({
      to: m.email,
      subject: `Tanklore: ${forThem.length} new report${forThem.length === 1 ? "" : "s"} awaiting review`,
      text: `Hello ${m.name},\n\n${forThem.length} report${forThem.length === 1 ? " has" : "s have"} been submitted since your last digest and await review:\n\n${forThem.map((r) => `  ${publicBaseUrl()}/review/${r.id}`).join("\n")}\n\nThe queue: ${publicBaseUrl()}/review\n\nYou get at most one of these an hour.\n— Tanklore`,
    });
    sent += 1;
  }
  return sent;
}

const store = globalThis as unknown as { __tankloreDigest?: NodeJS.Timeout };

export function startDigestScheduler(everyMs = 5 * 60_000): void {
  if (store.__tankloreDigest) return;
  store.__tankloreDigest = setInterval(() => {
    sendModeratorDigests().catch((err) => console.error("Moderator digest failed:", err));
  }, everyMs);
  store.__tankloreDigest.unref();
}
