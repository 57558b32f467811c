import { AppError } from "./errors";
import type { Actor } from "./roles";

/**
 * Who may do what: the one place the app's access rules live. Every function in features/<name>/server
 * takes its caller and asks these before it reads or writes; pages, route handlers and server actions
 * only pass the caller along. docs/security.md lists which function applies which rule.
 */

/** The caller of a data function: the signed-in person, or null for a visitor. */
export interface Caller {
  actor: Actor | null;
}

/** The fields of a report the rules look at. */
export interface ReportAccess {
  authorId: string;
  status: string;
}

export const isSignedIn = (actor: Actor | null): actor is Actor => actor !== null;
export const isAdmin = (actor: Actor | null) => actor?.role === "admin";
/** Moderators and admins review submitted reports. */
export const canReview = (actor: Actor | null) => actor?.role === "moderator" || actor?.role === "admin";

/**
 * Who may see a report: its author always; moderators and admins once it has been submitted
 * (drafts stay private). Everyone else gets 404, so a report's existence is not revealed.
 */
export function canSeeReport(actor: Actor | null, r: ReportAccess): boolean {
  if (!actor) return false;
  if (r.authorId === actor.id) return true;
  return canReview(actor) && r.status !== "draft";
}

export const isReportAuthor = (actor: Actor | null, r: ReportAccess) => actor !== null && r.authorId === actor.id;
/** Only the author changes a report, while it is a draft or returned for changes. */
export const canEditReport = (actor: Actor | null, r: ReportAccess) =>
  isReportAuthor(actor, r) && (r.status === "draft" || r.status === "returned");
/** A reviewer decides on (or corrects) a submitted report that is not their own. */
export const canDecide = (actor: Actor | null, r: ReportAccess) =>
  canReview(actor) && r.status !== "draft" && !isReportAuthor(actor, r);

/** Club officers' powers. */
export const canManageMembers = isAdmin;
export const canManageCatalogue = isAdmin;
export const canEditClubSettings = isAdmin;
export const canReadOutbox = isAdmin;
/** Background jobs' errors name members' addresses. */
export const canReadJobs = isAdmin;
export const canImportReports = isAdmin;
/** A backup holds every account and the session secret. */
export const canTakeBackups = isAdmin;
/** The pseudonymised reports export is for reviewers. */
export const canExportReports = canReview;

/** A member may see their own account; admins see everyone's. */
export const canSeeMember = (actor: Actor | null, memberId: string) => isAdmin(actor) || actor?.id === memberId;

/**
 * Throws the error a caller who fails `rule` gets: 401 for a visitor, 403 for the wrong role.
 * `what` finishes "Your role does not allow you to …".
 */
export function authorize(actor: Actor | null, rule: (actor: Actor) => boolean, what: string): asserts actor is Actor {
  if (!actor) throw new AppError("unauthenticated", "Sign in to do this.");
  if (!rule(actor)) throw new AppError("forbidden", `Your role does not allow you to ${what}.`);
}
