import "server-only";
export { exportReportsCsv, importReportsCsv, pseudonym, reportColumns, type ImportResult } from "./reports-csv";
export { getExchangeOverview } from "./overview";
export {
  archivePaths, BACKUP_FORMAT, BACKUP_FORMAT_VERSION, backupsDir, countClub, createBackup, pruneBackups, runNightlyBackupIfDue, secretFingerprint,
  startBackupScheduler, writeBackupFile, type BackupCounts, type BackupManifest,
} from "./backup";
export { restoreBackup, RestoreRefusedError, type RestoreResult, type RestoreTarget } from "./restore";
