import "server-only";
import type { OutgoingMail } from "@/features/mail";
import { queueMail } from "@/features/mail/server";
import { kickJobs, settleJobs } from "@/features/shared/server/jobs";

// Mail that must not slow the answer (the time would tell whether an address has an account) is queued in the
// database after the response and sent by the job runner (features/shared/server/jobs.ts): it survives a
// restart, is retried, and a failure is recorded for the admins. Tests can wait for the queue to drain.
const pending = new Set<Promise<void>>();

export function sendMailLater(mail: OutgoingMail): void {
  const p = queueMail(mail)
    .then(async () => {
      await kickJobs(["mail"]);
    })
    .catch((err) => console.error(`Could not queue "${mail.subject}":`, err))
    .finally(() => pending.delete(p));
  pending.add(p);
}

/** Resolves once every mail queued so far has been handed to the mail server. */
export async function settleBackgroundMail(): Promise<void> {
  while (pending.size) await Promise.all([...pending]);
  await settleJobs();
}
