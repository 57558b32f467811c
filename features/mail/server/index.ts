export { sendMail, listCaughtMail, readCaughtMail, mailDir } from "./mailer";
export { verificationMail, resetMail } from "./templates";
