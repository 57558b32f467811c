import "server-only";
import type { OutgoingMail } from "./mailer";

const footer =
  "\n\n— Tanklore, your club's treatment-outcome registry.\nYou get this because of an action on your account.";

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

export function signUpAttemptMail(to: string, name: string, signInUrl: string, resetUrl: string): OutgoingMail {
  return {
    to,
    subject: "Someone tried to join Tanklore with your address",
    text: `Hello ${name},\n\nSomeone (perhaps you) tried to create a new Tanklore account with this e-mail address. You already have an account, so nothing was created and nothing changed.\n\nTo sign in: ${signInUrl}\nForgot your password? ${resetUrl}\n\nIf it was not you, ignore this message.${footer}`,
  };
}

export function signInLockedMail(to: string, name: string, minutes: number, resetUrl: string): OutgoingMail {
  return {
    to,
    subject: "Password sign-in to your Tanklore account is paused",
    text: `Hello ${name},\n\nThere were many wrong passwords for your account in a short time, so password sign-in is paused for ${minutes} minutes. Your password still works after that.\n\nIf these attempts were not yours, choose a new password: ${resetUrl}${footer}`,
  };
}
