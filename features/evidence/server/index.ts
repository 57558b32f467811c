import "server-only";
export { lockPair, recomputeGroupAgent, replacePairFigures, summarySql, toleratedCountsSql } from "./compute";
export { drainEvidenceOutbox, recomputeAfterChange, recomputeAll, startEvidenceWorker, stopEvidenceWorker, type DrainResult } from "./worker";
export { getSummaries, getSummaryDetail } from "./queries";
export { doseResponses, doseTrialsSql } from "./dose-response";
export { recomputeStale } from "./stale";
export { groupSummary, planCalendarFromQuery, planDoseWithEvidence } from "./dose-advice";
