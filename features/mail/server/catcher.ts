import "server-only";
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";
import { objectStorage } from "@/features/shared/server/object-storage";

/**
 * The local mail catcher used when no SMTP_URL is set: a loopback SMTP server that keeps each message as an
 * .eml object under mail/ in the club's storage (the data directory, or the bucket that several processes
 * share, so the admin outbox shows every process's mail). Stored whole, so a listed message is complete.
 */
export async function startCatcher(port: number): Promise<{ port: number; close: () => Promise<void> }> {
  let seq = 0;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, _session, callback) {
      const name = `${new Date().toISOString().replace(/[:.]/g, "-")}-${process.pid}-${++seq}.eml`;
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", (err) => callback(err));
      stream.on("end", () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error("Message too large for the mail catcher"), { responseCode: 552 }));
          return;
        }
        objectStorage()
          .put(`mail/${name}`, Buffer.concat(chunks), "message/rfc822")
          .then(
            () => callback(),
            (err: Error) => callback(err),
          );
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
