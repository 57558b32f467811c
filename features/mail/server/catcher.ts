import "server-only";
import fs from "node:fs";
import path from "node:path";
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";

/**
 * The local mail catcher used when no SMTP_URL is set: a loopback SMTP server that stores each
 * message as an .eml file. Written to a temporary name and renamed, so a listed file is complete.
 */
export async function startCatcher(mailDir: string, port: number): Promise<{ port: number; close: () => Promise<void> }> {
  fs.mkdirSync(mailDir, { recursive: true });
  let seq = 0;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, _session, callback) {
      const name = `${new Date().toISOString().replace(/[:.]/g, "-")}-${process.pid}-${++seq}.eml`;
      const tmp = path.join(mailDir, `.${name}.part`);
      const out = fs.createWriteStream(tmp);
      stream.pipe(out);
      stream.on("error", (err) => callback(err));
      out.on("error", (err) => callback(err));
      out.on("finish", () => {
        if (stream.sizeExceeded) {
          fs.rmSync(tmp, { force: true });
          callback(Object.assign(new Error("Message too large for the mail catcher"), { responseCode: 552 }));
          return;
        }
        fs.renameSync(tmp, path.join(mailDir, name));
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  const bound = (server.server.address() as AddressInfo).port;
  return { port: bound, close: () => new Promise((r) => server.close(() => r())) };
}
