export { exportReportsCsv, importReportsCsv, pseudonym, reportColumns, type ImportResult } from "./reports-csv";
