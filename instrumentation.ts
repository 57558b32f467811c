// Runs once when the Next.js server starts (never during `next build`): start the reminder, moderator-digest and
// nightly-backup schedulers and the evidence worker that drains the recompute outbox, and bring stored evidence
// summaries up to the current method.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NEXT_PHASE === "phase-production-build") return;
  const { startReminderScheduler } = await import("@/features/reports/server");
  const { startDigestScheduler } = await import("@/features/review/server");
  const { startEvidenceWorker } = await import("@/features/evidence/server");
  const { startBackupScheduler } = await import("@/features/exchange/server");
  startReminderScheduler();
  startDigestScheduler();
  startEvidenceWorker();
  startBackupScheduler();
  // Summaries stored by an older method (or at another confidence level) are recomputed before serving.
  const { recomputeStale } = await import("@/features/evidence/server");
  try {
    const n = await recomputeStale();
    if (n) console.log(`Recomputed ${n} evidence summaries for the current method.`);
  } catch (err) {
    console.error("Could not recompute stale evidence summaries:", err instanceof Error ? err.message : err);
  }
}
