export { sendMail, listCaughtMail, readCaughtMail, mailDir } from "./mailer";
export { verificationMail, resetMail, signUpAttemptMail, signInLockedMail } from "./templates";
