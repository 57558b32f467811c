import http from "node:http";
import next from "next";
import { getEnv } from "@/features/shared/env";
import { stampPeerAddress } from "./peer-address";

// The production server behind `npm start` and `npm run demo`: Next.js in a plain Node HTTP server,
// because a Next.js route handler cannot see the TCP peer's address, and the client address for
// sign-in limits must not come from a header any client can write (see docs/security.md).
process.env.TANKLORE_PEER_HEADER = "on";
const port = getEnv().PORT;
const app = next({ dev: false, dir: process.cwd(), port });
await app.prepare();
const handle = app.getRequestHandler();

const server = http.createServer((req, res) => {
  stampPeerAddress(req);
  handle(req, res).catch((err: unknown) => {
    console.error("Unhandled error while serving a request:", err);
    if (!res.headersSent) res.statusCode = 500;
    res.end();
  });
});
server.listen(port, () => console.log(`Listening on port ${port}`));
for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    server.close();
    void app.close().finally(() => process.exit(0));
  });
}
