export { recomputeAfterChange, recomputeAll, recomputeGroupAgent, summarySql, toleratedCountsSql } from "./compute";
export { getSummaries, getSummaryDetail } from "./queries";
export { planCalendarFromQuery, planDoseWithEvidence } from "./dose-advice";
