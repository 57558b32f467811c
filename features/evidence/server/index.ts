import "server-only";
export {
  lockPair,
  pairFiguresSql,
  recomputeGroupAgent,
  replacePairFigures,
  summarySql,
  toleratedCountsSql,
} from "./compute";
export {
  drainEvidenceOutbox,
  recomputeAfterChange,
  recomputeAll,
  startEvidenceWorker,
  stopEvidenceWorker,
  type DrainResult,
} from "./worker";
export { getEvidenceCatalogue, getSummaries, getSummaryDetail } from "./queries";
export {
  evidenceCacheListening,
  evidenceCacheVersion,
  evidenceTags,
  startEvidenceCacheListener,
  stopEvidenceCacheListener,
} from "./cache";
export { doseResponses, doseTrialsSql } from "./dose-response";
export { recomputeStale } from "./stale";
export { groupSummary, planCalendarFromQuery, planDoseWithEvidence } from "./dose-advice";
