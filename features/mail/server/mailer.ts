import "server-only";
import path from "node:path";
import nodemailer, { type Transporter } from "nodemailer";
import { simpleParser } from "mailparser";
import { dataDir, getEnv } from "@/features/shared/env";
import { authorize, canReadOutbox, type Caller } from "@/features/shared/policies";
import { objectStorage } from "@/features/shared/server/object-storage";
import { startCatcher } from "./catcher";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

const store = globalThis as unknown as { __tankloreMail?: Promise<Transporter> };

export function mailDir(): string {
  return path.join(dataDir(), "mail");
}

async function createTransport(): Promise<Transporter> {
  const env = getEnv();
  if (env.SMTP_URL) return nodemailer.createTransport(env.SMTP_URL);
  const catcher = await startCatcher(env.MAIL_CATCHER_PORT);
  return nodemailer.createTransport({ host: "127.0.0.1", port: catcher.port, secure: false, ignoreTLS: true });
}

function transport(): Promise<Transporter> {
  if (!store.__tankloreMail) {
    store.__tankloreMail = createTransport().catch((err) => {
      store.__tankloreMail = undefined;
      throw err;
    });
  }
  return store.__tankloreMail;
}

export async function sendMail(mail: OutgoingMail): Promise<void> {
  const t = await transport();
  await t.sendMail({ from: getEnv().MAIL_FROM, ...mail });
}

export interface StoredMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string;
  subject: string;
  /** The message's text, every link masked. */
  text: string;
  /** The message's HTML part, if any, every link masked; null when it has none. */
  html: string | null;
}

/** Messages kept by the local mail catcher, newest first, for admins; links are masked. */
export async function listCaughtMail({ actor }: Caller, limit = 100): Promise<StoredMail[]> {
  authorize(actor, canReadOutbox, "read the mail outbox");
  const objects = (await objectStorage().list("mail/"))
    .filter((o) => o.key.endsWith(".eml"))
    .reverse()
    .slice(0, limit);
  return (await Promise.all(objects.map((o) => readStored(o.key.slice("mail/".length), o.modifiedAt)))).filter(
    (m): m is StoredMail => m !== null,
  );
}

/** One kept message for an admin, links masked; null when there is no such message. */
export async function readCaughtMail({ actor }: Caller, id: string): Promise<StoredMail | null> {
  authorize(actor, canReadOutbox, "read the mail outbox");
  return readStored(id);
}

/** The time in a catcher name (2026-12-02T12-41-14-123Z-…), for a store that keeps no file times of its own. */
function timeInName(id: string): Date | null {
  const m = id.match(/^(\d{4}-\d{2}-\d{2})T(\d{2})-(\d{2})-(\d{2})-(\d{3})Z/);
  return m ? new Date(`${m[1]}T${m[2]}:${m[3]}:${m[4]}.${m[5]}Z`) : null;
}

async function readStored(id: string, modifiedAt?: Date): Promise<StoredMail | null> {
  if (!/^[\w.-]+\.eml$/.test(id) || id.startsWith(".")) return null;
  const raw = await objectStorage().get(`mail/${id}`);
  if (!raw) return null;
  const parsed = await simpleParser(raw);
  const addr = (a: typeof parsed.to) => (Array.isArray(a) ? a.map((x) => x.text).join(", ") : (a?.text ?? ""));
  return {
    id,
    receivedAt: (timeInName(id) ?? modifiedAt ?? new Date()).toISOString(),
    from: parsed.from?.text ?? "",
    to: addr(parsed.to),
    subject: parsed.subject ?? "(no subject)",
    text: maskLinks(parsed.text ?? ""),
    html: typeof parsed.html === "string" ? maskLinks(parsed.html) : null,
  };
}

export const MASK = "•••";
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Masks what could work as a key in a link: every query value and fragment, and every long path
 * segment (sign-in tokens travel in either) — except report ids, which open nothing by themselves.
 * An admin reading the outbox sees who got which kind of link, and cannot use it.
 */
export function maskLinks(text: string): string {
  return text.replace(/https?:\/\/[^\s"'<>]+/g, (link) => {
    let url: URL;
    try {
      url = new URL(link.replace(/&amp;/g, "&"));
    } catch {
      return MASK;
    }
    const pathPart = url.pathname
      .split("/")
      .map((seg) => (seg.length >= 16 && !UUID.test(seg) ? MASK : seg))
      .join("/");
    const query = [...url.searchParams.keys()].map((k) => `${k}=${MASK}`).join("&");
    return `${url.origin}${pathPart}${query ? `?${query}` : ""}${url.hash ? `#${MASK}` : ""}`;
  });
}
