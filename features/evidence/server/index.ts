import "server-only";
export { recomputeAfterChange, recomputeAll, recomputeGroupAgent, summarySql, toleratedCountsSql } from "./compute";
export { getSummaries, getSummaryDetail } from "./queries";
export { doseResponses, doseTrialsSql } from "./dose-response";
export { recomputeStale } from "./stale";
