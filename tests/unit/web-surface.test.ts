import { describe, expect, it } from "vitest";
import { clubSettingsSchema } from "@/features/catalogue";
import { controlCharacterIssues, refuseOtherMethods } from "@/features/shared/server/http";
import { contentSecurityPolicy, securityHeaders, servedOverHttps } from "@/features/shared/server/security-headers";

describe("the control-character walk", () => {
  it("names each field by its path, in body order, and lets tab, LF and CR through", () => {
    const body = { a: "ok\t\r\n", water: { unit: "L\u0000" }, list: ["x", "y\u007f"], "k\u0001": 1 };
    expect(controlCharacterIssues(body)).toEqual([
      { path: "water.unit", message: expect.stringContaining("U+0000") },
      { path: "list.1", message: expect.stringContaining("U+007F") },
      { path: "k\\u0001", message: expect.stringContaining("field's name") },
    ]);
    expect(controlCharacterIssues("\u0002")).toEqual([{ path: "(body)", message: expect.stringContaining("U+0002") }]);
  });

  it("survives a body nested far deeper than the call stack, and stops listing after 50 issues", () => {
    let deep: unknown = "\u0000";
    for (let i = 0; i < 200_000; i++) deep = [deep];
    expect(controlCharacterIssues(deep)).toHaveLength(1);
    expect(controlCharacterIssues(Array.from({ length: 500 }, () => "\u0000"))).toHaveLength(50);
  });

  it("checks a query parameter named __proto__ like any other", async () => {
    const { parseQuery } = await import("@/features/shared/server/http");
    const { z } = await import("zod");
    expect(() => parseQuery(new Request("http://localhost/x?__proto__=a%00&__proto__=b"), z.object({}))).toThrow(
      /control characters/,
    );
    expect(parseQuery(new Request("http://localhost/x?__proto__=ok"), z.object({}))).toEqual({});
  });

  it("also guards the club settings form, which posts to a server action", () => {
    expect(
      clubSettingsSchema.safeParse({
        name: "Fin\u0000 club",
        confidenceLevel: 95,
        minReports: 3,
        defaultVolumeUnit: "L",
        defaultTemperatureUnit: "C",
      }).success,
    ).toBe(false);
  });
});

describe("methods a route lacks", () => {
  it("answer 405 in the envelope with Allow, and OPTIONS 204 with the same Allow", async () => {
    const h = refuseOtherMethods("GET", "POST");
    const r = await h.PUT(new Request("http://localhost/api/x", { method: "PUT" }));
    expect(r.status).toBe(405);
    expect(r.headers.get("allow")).toBe("GET, POST, HEAD, OPTIONS");
    expect(await r.json()).toEqual({
      error: { code: "method_not_allowed", message: "PUT is not allowed here; use GET or POST." },
    });
    const o = await h.OPTIONS(new Request("http://localhost/api/x", { method: "OPTIONS" }));
    expect(o.status).toBe(204);
    expect(o.headers.get("allow")).toBe("GET, POST, HEAD, OPTIONS");
    expect(refuseOtherMethods("POST").GET).toBeTypeOf("function");
  });
});

describe("security headers", () => {
  const page = { nonce: "abc123==", api: false, https: false, dev: false };

  it("gives pages nonce-only scripts, inline styles without a nonce (which would disable them), and the required directives", () => {
    const csp = contentSecurityPolicy(page);
    expect(csp).toContain("script-src 'self' 'nonce-abc123==' 'strict-dynamic'");
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    expect(csp).not.toMatch(/style-src[^;]*nonce/);
    for (const d of ["object-src 'none'", "base-uri 'none'", "frame-ancestors 'none'"]) expect(csp).toContain(d);
    expect(csp).not.toContain("unsafe-eval");
    expect(contentSecurityPolicy({ ...page, dev: true })).toContain("'unsafe-eval'");
  });

  it("gives API answers a policy that allows nothing, and HSTS only over https", () => {
    expect(contentSecurityPolicy({ ...page, api: true })).toBe(
      "default-src 'none'; object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'",
    );
    expect(securityHeaders(page)["strict-transport-security"]).toBeUndefined();
    expect(securityHeaders({ ...page, https: true })["strict-transport-security"]).toBe("max-age=31536000");
    expect(securityHeaders(page)).toMatchObject({
      "x-content-type-options": "nosniff",
      "x-frame-options": "DENY",
      "referrer-policy": "same-origin",
    });
  });

  it("reads https from the URL, the first X-Forwarded-Proto, or the configured public address", () => {
    expect(servedOverHttps("http://localhost:3000/", null, undefined)).toBe(false);
    expect(servedOverHttps("http://localhost:3000/", "https, http", undefined)).toBe(true);
    expect(servedOverHttps("http://localhost:3000/", "http", "https://club.example.org")).toBe(true);
    expect(servedOverHttps("https://club.example.org/", null, "http://localhost:3000")).toBe(true);
  });
});
