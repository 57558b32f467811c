import { isIP } from "node:net";
import { getEnv } from "@/features/shared/env";

/** Set by Tanklore's own server (db/http-server.ts) to the TCP peer's address, replacing any client value. */
export const PEER_ADDRESS_HEADER = "x-tanklore-peer-address";
/** The resolved client address handed to better-auth (the only header its rate limiter reads). */
export const CLIENT_ADDRESS_HEADER = "x-tanklore-client-address";

function valid(value: string | null | undefined): string | null {
  if (!value) return null;
  let v = value.trim();
  if (v.startsWith("::ffff:") && isIP(v.slice(7)) === 4) v = v.slice(7);
  return isIP(v) ? v.toLowerCase() : null;
}

/**
 * The address a request came from, by the operator's explicit setting TRUSTED_PROXY_HOPS:
 * - 0 (default): the socket's address as stamped by Tanklore's server; X-Forwarded-For is ignored,
 *   because any client can send it. Without that stamp (`next dev`, tests) the address is unknown (null).
 * - N > 0: each trusted proxy appends the address it saw, so the client is the N-th entry from the
 *   right; entries further left were written by the client and are ignored.
 */
export function clientAddress(headers: Headers): string | null {
  const env = getEnv();
  const peer = env.TANKLORE_PEER_HEADER === "on" ? valid(headers.get(PEER_ADDRESS_HEADER)) : null;
  const hops = env.TRUSTED_PROXY_HOPS;
  if (hops === 0) return peer;
  const chain = (headers.get("x-forwarded-for") ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  if (chain.length === 0) return peer;
  return valid(chain[Math.max(0, chain.length - hops)]);
}
