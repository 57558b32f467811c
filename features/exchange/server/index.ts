export { exportReportsCsv, pseudonym, reportColumns, csvWriteOptions, type ExchangedEvent } from "./reports-csv";
export {
  importReportsCsv, prepareReportsImport, runReportsImport, ImportRefused, IMPORT_BATCH, MAX_IMPORT_ROWS,
  type ImportResult, type ImportProgress, type ImportOptions, type PreparedImport,
} from "./reports-import";
export { FORMULA_START, unneutralise, controlCharacterIn } from "./csv-cells";
