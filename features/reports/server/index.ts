import "server-only";
export {
  canSeeReport,
  getReportById,
  getReportRowById,
  getVisibleReportRow,
  getReportsByAuthorId,
  getReportHistory,
  getReportFormCatalogue,
  type ReportView,
} from "./queries";
export {
  createReport,
  createDraft,
  updateReport,
  submitReport,
  deleteDraft,
  recordEvent,
  lockEditable,
} from "./mutations";
export {
  addCourseEntry,
  correctCourseEntry,
  getCourse,
  runDueReminders,
  startReminderScheduler,
  type CourseOptions,
} from "./course";
export { computeFlags, type Flag } from "./flags";
export { derive } from "./derive";
export type { ReportRow } from "./mapping";
export { getMemberHome, type MemberHome } from "./home";
