import fs from "node:fs";
import path from "node:path";
import nodemailer, { type Transporter } from "nodemailer";
import { simpleParser } from "mailparser";
import { dataDir, getEnv } from "@/features/shared/env";
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
  const catcher = await startCatcher(mailDir(), env.MAIL_CATCHER_PORT);
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
  text: string;
}

/** Messages kept by the local mail catcher, newest first. */
export async function listCaughtMail(limit = 100): Promise<StoredMail[]> {
  const dir = mailDir();
  if (!fs.existsSync(dir)) return [];
  const names = fs
    .readdirSync(dir)
    .filter((n) => n.endsWith(".eml"))
    .sort()
    .reverse()
    .slice(0, limit);
  return Promise.all(names.map((name) => readCaughtMail(name) as Promise<StoredMail>));
}

export async function readCaughtMail(id: string): Promise<StoredMail | null> {
  if (!/^[\w.-]+\.eml$/.test(id) || id.startsWith(".")) return null;
  const file = path.join(mailDir(), id);
  if (!fs.existsSync(file)) return null;
  const parsed = await simpleParser(fs.readFileSync(file));
  const addr = (a: typeof parsed.to) => (Array.isArray(a) ? a.map((x) => x.text).join(", ") : (a?.text ?? ""));
  return {
    id,
    receivedAt: fs.statSync(file).mtime.toISOString(),
    from: parsed.from?.text ?? "",
    to: addr(parsed.to),
    subject: parsed.subject ?? "(no subject)",
    text: parsed.text ?? "",
  };
}
