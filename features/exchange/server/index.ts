import "server-only";
export { exportReportsCsv, pseudonym, reportColumns, csvWriteOptions, type ExchangedEvent } from "./reports-csv";
export {
  importReportsCsv,
  prepareReportsImport,
  runReportsImport,
  ImportRefused,
  IMPORT_BATCH,
  MAX_IMPORT_ROWS,
  type ImportResult,
  type ImportProgress,
  type ImportOptions,
  type PreparedImport,
} from "./reports-import";
export { FORMULA_START, unneutralise, controlCharacterIn } from "./csv-cells";
export { getExchangeOverview } from "./overview";
export {
  archivePaths,
  BACKUP_FORMAT,
  BACKUP_FORMAT_VERSION,
  backupsDir,
  countClub,
  createBackup,
  pruneBackups,
  runNightlyBackupIfDue,
  secretFingerprint,
  startBackupScheduler,
  writeBackupFile,
  storeBackupFile,
  pruneStoredBackups,
  type BackupCounts,
  type BackupManifest,
} from "./backup";
export { restoreBackup, RestoreRefusedError, type RestoreResult, type RestoreTarget } from "./restore";
