// Runs once when the Next.js server starts (never during `next build`): start the job runner (notice mails and
// the reminder, moderator-digest and nightly-backup rounds, claimed in the database so each runs once across
// processes) and the evidence worker that drains the recompute outbox, and bring stored evidence summaries up
// to the current method.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NEXT_PHASE === "phase-production-build") return;
  // Importing each feature's server entry registers its jobs with the runner.
  await import("@/features/mail/server");
  await import("@/features/reports/server");
  await import("@/features/review/server");
  await import("@/features/exchange/server");
  const { startJobRunner } = await import("@/features/shared/server/jobs");
  const { startEvidenceWorker } = await import("@/features/evidence/server");
  startJobRunner();
  startEvidenceWorker();
  // Summaries stored by an older method (or at another confidence level) are recomputed before serving.
  const { recomputeStale } = await import("@/features/evidence/server");
  try {
    const n = await recomputeStale();
    if (n) console.log(`Recomputed ${n} evidence summaries for the current method.`);
  } catch (err) {
    console.error("Could not recompute stale evidence summaries:", err instanceof Error ? err.message : err);
  }
}
