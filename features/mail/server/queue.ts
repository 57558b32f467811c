import "server-only";
import { enqueueJob, registerJob } from "@/features/shared/server/jobs";
import type { Db } from "@/db/client";
import { sendMail, type OutgoingMail } from "./mailer";

/**
 * Notice mails go through the job queue: queued in the database (in the caller's transaction when given),
 * then sent by whichever process claims them, retried with growing delays (1 min, 2, 4 … up to 6 h, eight
 * tries), and kept as failed for the admins when they never go.
 */
registerJob("mail", {
  run: (mail: OutgoingMail) => sendMail(mail),
  maxAttempts: 8,
  backoffMs: (attempt) => Math.min(6 * 3600_000, 60_000 * 2 ** (attempt - 1)),
  summarize: (mail: OutgoingMail) => ({ to: mail.to, subject: mail.subject }),
});

export async function queueMail(mail: OutgoingMail, tx?: Pick<Db, "insert" | "execute">): Promise<void> {
  await enqueueJob("mail", { ...mail }, { tx });
}
