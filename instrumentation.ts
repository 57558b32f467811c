// Runs once when the Next.js server starts (never during `next build`): start the reminder, moderator-digest and nightly-backup schedulers.
export async function register() {
  if (process.env.NEXT_RUNTIME !== "nodejs" || process.env.NEXT_PHASE === "phase-production-build") return;
  const { startReminderScheduler } = await import("@/features/reports/server");
  const { startDigestScheduler } = await import("@/features/review/server");
  const { startBackupScheduler } = await import("@/features/exchange/server");
  startReminderScheduler();
  startDigestScheduler();
  startBackupScheduler();
}
