import { describe, expect, it } from "vitest";
import { z } from "zod";
import { AppError } from "@/features/shared/errors";
import { parseJson, parseQuery, route } from "@/features/shared/server/http";

const schema = z.object({ water: z.object({ volume: z.number().positive("Volume must be above 0.") }) });
const echo = route(async (req) => Response.json(await parseJson(req, schema)));
const ctx = { params: Promise.resolve({}) };
const post = (body: string, headers: Record<string, string> = { "content-type": "application/json" }) =>
  echo(new Request("http://localhost/x", { method: "POST", body, headers }), ctx);

describe("the error envelope", () => {
  it("answers 422 with the field path and message for a failed schema", async () => {
    const res = await post(JSON.stringify({ water: { volume: -3 } }));
    expect(res.status).toBe(422);
    expect(await res.json()).toEqual({
      error: {
        code: "invalid",
        message: expect.stringMatching(/fields need fixing/),
        issues: [{ path: "water.volume", message: "Volume must be above 0." }],
      },
    });
  });

  it("answers 400 for a body that is not JSON and 415 for another content type", async () => {
    expect((await post("{oops")).status).toBe(400);
    const wrongType = await post("a=1", { "content-type": "application/x-www-form-urlencoded" });
    expect(wrongType.status).toBe(415);
    expect((await wrongType.json()).error.code).toBe("unsupported_type");
  });

  it("answers 413 for a body over the limit", async () => {
    const res = await post(JSON.stringify({ pad: "x".repeat(300 * 1024) }));
    expect(res.status).toBe(413);
  });

  it("maps typed errors to their status and hides unexpected ones behind a 500 envelope", async () => {
    const conflict = route(async () => {
      throw new AppError("conflict", "Already decided.");
    });
    const r = await conflict(new Request("http://localhost/x"), ctx);
    expect(r.status).toBe(409);
    expect(await r.json()).toEqual({ error: { code: "conflict", message: "Already decided." } });

    const boom = route(async () => {
      throw new Error("disk on fire");
    });
    const original = console.error;
    console.error = () => {};
    const b = await boom(new Request("http://localhost/x"), ctx);
    console.error = original;
    expect(b.status).toBe(500);
    expect(JSON.stringify(await b.json())).not.toContain("disk on fire");
  });

  it("validates query parameters with the same envelope", () => {
    const q = z.object({ page: z.coerce.number().int().min(1, "page starts at 1.") });
    expect(parseQuery(new Request("http://localhost/x?page=3"), q)).toEqual({ page: 3 });
    try {
      parseQuery(new Request("http://localhost/x?page=0"), q);
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(AppError);
      expect((err as AppError).issues).toEqual([{ path: "page", message: "page starts at 1." }]);
    }
  });
});
