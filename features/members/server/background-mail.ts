import "server-only";
import type { OutgoingMail } from "@/features/mail";
import { sendMail } from "@/features/mail/server";

// Mail that must not slow the answer (the time would tell whether an address has an account)
// is sent after the response; failures are logged, and tests can wait for the queue to drain.
const pending = new Set<Promise<void>>();

export function sendMailLater(mail: OutgoingMail): void {
  const p = sendMail(mail)
    .catch((err) => console.error(`Could not send "${mail.subject}":`, err))
    .finally(() => pending.delete(p));
  pending.add(p);
}

/** Resolves once every mail queued so far has been handed to the mail server. */
export async function settleBackgroundMail(): Promise<void> {
  while (pending.size) await Promise.all([...pending]);
}
