export { getReviewQueue, countAwaitingReview, getGroupContext } from "./queue";
export { decideReport, correctReport, type DecisionResult } from "./decide";
export { sendModeratorDigests, startDigestScheduler } from "./digest";
