import "server-only";
export { getReviewQueue, countAwaitingReview, getGroupContext, getReviewPage } from "./queue";
export { listAllReports } from "./all-reports";
export { decideReport, correctReport, type DecisionResult } from "./decide";
export { sendModeratorDigests, startDigestScheduler } from "./digest";
