export type { OutgoingMail, StoredMail } from "./server/mailer";
