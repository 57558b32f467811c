import "server-only";
export { recomputeAfterChange, recomputeAll, recomputeGroupAgent, summarySql, toleratedCountsSql } from "./compute";
export { getSummaries, getSummaryDetail } from "./queries";
