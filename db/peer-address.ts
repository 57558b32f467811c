import type { IncomingMessage } from "node:http";

// Must match PEER_ADDRESS_HEADER in features/members/server/client-address.ts (which the app reads
// only when TANKLORE_PEER_HEADER=on, as db/http-server.ts sets for its own process).
export const PEER_ADDRESS_HEADER = "x-tanklore-peer-address";

/** Replaces any copy of the header a client sent with the address of the TCP peer. */
export function stampPeerAddress(req: IncomingMessage): void {
  delete req.headers[PEER_ADDRESS_HEADER];
  const raw: string[] = [];
  for (let i = 0; i + 1 < req.rawHeaders.length; i += 2) {
    if (req.rawHeaders[i]!.toLowerCase() !== PEER_ADDRESS_HEADER) raw.push(req.rawHeaders[i]!, req.rawHeaders[i + 1]!);
  }
  req.rawHeaders.splice(0, req.rawHeaders.length, ...raw);
  const address = req.socket.remoteAddress;
  if (address) {
    req.headers[PEER_ADDRESS_HEADER] = address;
    req.rawHeaders.push(PEER_ADDRESS_HEADER, address);
  }
}
