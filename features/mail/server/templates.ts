import "server-only";
import type { OutgoingMail } from "./mailer";

const footer = "\n\n— Tanklore, your club's treatment-outcome registry.\nYou get this because of an action on your account.";

export function verificationMail(to: string, name: string, url: string): OutgoingMail {
  return {
    to,
    subject: "Confirm your e-mail address for Tanklore",
    text: `Hello ${name},\n\nOpen this link to confirm your address and finish joining:\n\n${url}\n\nThe link works for one hour. If you did not sign up, ignore this message.${footer}`,
  };
}

export function resetMail(to: string, name: string, url: string): OutgoingMail {
  return {
    to,
    subject: "Choose a new Tanklore password",
    text: `Hello ${name},\n\nSomeone (we hope you) asked to reset your password. Open this link to choose a new one:\n\n${url}\n\nThe link works for one hour. If you did not ask, ignore this message: your password stays as it is.${footer}`,
  };
}
