import "server-only";
export { sendMail, listCaughtMail, readCaughtMail, mailDir, maskLinks } from "./mailer";
export { verificationMail, resetMail, signUpAttemptMail, signInLockedMail } from "./templates";
export { queueMail } from "./queue";
