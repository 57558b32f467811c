import "server-only";
export { exportReportsCsv, importReportsCsv, pseudonym, reportColumns, type ImportResult } from "./reports-csv";
export { getExchangeOverview } from "./overview";
