// Runs once when the Next.js server starts (never during `next build`): start the reminder and moderator-digest
// schedulers, and the evidence worker that drains the recompute outbox.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NEXT_PHASE === "phase-production-build") return;
  const { startReminderScheduler } = await import("@/features/reports/server");
  const { startDigestScheduler } = await import("@/features/review/server");
  const { startEvidenceWorker } = await import("@/features/evidence/server");
  startReminderScheduler();
  startDigestScheduler();
  startEvidenceWorker();
}
