import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterEach, describe, expect, it } from "vitest";
import { clientAddress, PEER_ADDRESS_HEADER } from "@/features/members/server/client-address";
import { PEER_ADDRESS_HEADER as SERVER_HEADER, stampPeerAddress } from "@/db/peer-address";

afterEach(() => {
  delete process.env.TRUSTED_PROXY_HOPS;
  delete process.env.TANKLORE_PEER_HEADER;
});

const h = (o: Record<string, string>) => new Headers(o);

describe("client address from the trusted-proxy setting", () => {
  it("ignores X-Forwarded-For with no trusted proxies and uses the stamped socket address", () => {
    expect(clientAddress(h({ "x-forwarded-for": "192.0.2.1" }))).toBeNull();
    process.env.TANKLORE_PEER_HEADER = "on";
    expect(clientAddress(h({ "x-forwarded-for": "192.0.2.1", [PEER_ADDRESS_HEADER]: "198.51.100.4" }))).toBe(
      "198.51.100.4",
    );
    expect(clientAddress(h({ [PEER_ADDRESS_HEADER]: "::ffff:198.51.100.4" }))).toBe("198.51.100.4");
    expect(clientAddress(h({ [PEER_ADDRESS_HEADER]: "not-an-address" }))).toBeNull();
  });

  it("does not trust the peer header unless Tanklore's own server stamps it", () => {
    expect(clientAddress(h({ [PEER_ADDRESS_HEADER]: "198.51.100.4" }))).toBeNull();
  });

  it("takes the entry written by the outermost trusted proxy, counting from the right", () => {
    process.env.TRUSTED_PROXY_HOPS = "1";
    expect(clientAddress(h({ "x-forwarded-for": "203.0.113.9, 198.51.100.7" }))).toBe("198.51.100.7");
    process.env.TRUSTED_PROXY_HOPS = "2";
    expect(clientAddress(h({ "x-forwarded-for": "203.0.113.9, 198.51.100.7, 10.0.0.2" }))).toBe("198.51.100.7");
    expect(clientAddress(h({ "x-forwarded-for": "garbage, 10.0.0.2" }))).toBeNull();
  });
});

describe("the server's peer stamp", () => {
  it("replaces a client-sent copy of the header with the socket's address", async () => {
    expect(SERVER_HEADER).toBe(PEER_ADDRESS_HEADER);
    const server = http.createServer((req, res) => {
      stampPeerAddress(req);
      res.end(
        JSON.stringify({
          header: req.headers[SERVER_HEADER],
          raw: req.rawHeaders.filter((x) => x.toLowerCase() === SERVER_HEADER).length,
        }),
      );
    });
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
    try {
      const port = (server.address() as AddressInfo).port;
      const res = await fetch(`http://127.0.0.1:${port}/`, { headers: { [SERVER_HEADER]: "203.0.113.66" } });
      expect(await res.json()).toEqual({ header: "127.0.0.1", raw: 1 });
    } finally {
      server.close();
    }
  });
});
