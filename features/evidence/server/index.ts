import "server-only";
export { lockPair, pairFiguresSql, recomputeGroupAgent, replacePairFigures, summarySql, toleratedCountsSql } from "./compute";
export { drainEvidenceOutbox, recomputeAfterChange, recomputeAll, startEvidenceWorker, stopEvidenceWorker, type DrainResult } from "./worker";
export { getSummaries, getSummaryDetail } from "./queries";
export { doseResponses, doseTrialsSql } from "./dose-response";
export { recomputeStale } from "./stale";
export { planCalendarFromQuery, planDoseWithEvidence } from "./dose-advice";
