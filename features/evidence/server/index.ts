export { recomputeAfterChange, recomputeAll, recomputeGroupAgent, summarySql } from "./compute";
export { getSummaries, getSummaryDetail } from "./queries";
