import "server-only";
export { sendMail, listCaughtMail, readCaughtMail, mailDir, maskLinks } from "./mailer";
export { verificationMail, resetMail } from "./templates";
