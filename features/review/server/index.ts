import "server-only";
export { getReviewQueue, countAwaitingReview, getGroupContext, getReviewPage } from "./queue";
export { decideReport, correctReport, type DecisionResult } from "./decide";
export { sendModeratorDigests, startDigestScheduler } from "./digest";
