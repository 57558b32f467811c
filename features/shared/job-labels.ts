/** How each kind of background work and each of its states reads on the admin's page (no enum on a page). */
export const JOB_KINDS: Record<string, { label: string; about: string }> = {
  mail: { label: "Notice mails", about: "Sign-up, reset and decision mails, sent one by one off the request path." },
  reminders: {
    label: "Reminders",
    about: "Every minute: mails members whose report or course asked for a reminder that is now due.",
  },
  "moderator-digest": {
    label: "Moderators' digest",
    about: "Every five minutes: mails each moderator the reports submitted since their last digest, at most hourly.",
  },
  "nightly-backup": {
    label: "Nightly backup",
    about: "Every ten minutes: takes the night's backup of the club's data once it is due.",
  },
  "evidence-recompute": {
    label: "Evidence recompute",
    about: "Recomputes a group's summaries after reports change; a failure here keeps the old figures.",
  },
};

export const jobKindLabel = (kind: string): string => JOB_KINDS[kind]?.label ?? kind.replace(/[-_]+/g, " ");

export const JOB_STATES: Record<string, string> = {
  queued: "waiting",
  running: "running",
  done: "done",
  failed: "gave up",
};

export const jobStateLabel = (status: string): string => JOB_STATES[status] ?? status;

/** A one-line description of which job it was, from the few payload fields the API keeps. */
export function jobSubject(summary: Record<string, unknown>): string {
  const parts: string[] = [];
  if (typeof summary.subject === "string") parts.push(`“${summary.subject}”`);
  // Not the recipient: no page but the outbox shows a member's address.
  if (typeof summary.groupSlug === "string") parts.push(`group ${summary.groupSlug.replace(/-/g, " ")}`);
  if (typeof summary.agentSlug === "string") parts.push(summary.agentSlug.replace(/-/g, " "));
  return parts.join(" ");
}
