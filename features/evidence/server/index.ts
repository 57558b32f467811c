export { lockPair, recomputeGroupAgent, replacePairFigures, summarySql, toleratedCountsSql } from "./compute";
export { drainEvidenceOutbox, recomputeAfterChange, recomputeAll, startEvidenceWorker, stopEvidenceWorker, type DrainResult } from "./worker";
export { getSummaries, getSummaryDetail } from "./queries";
