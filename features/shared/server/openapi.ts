import "server-only";
import { z } from "zod";

export interface Operation {
  method: "get" | "post" | "patch" | "delete";
  path: string;
  summary: string;
  tags: string[];
  auth?: "member" | "moderator" | "admin";
  query?: z.ZodObject;
  body?: z.ZodType;
  response: z.ZodType;
  status?: number;
  errors?: number[];
  /** The success body's media type when not JSON (e.g. text/calendar). */
  contentType?: string;
}

const errorSchema = z.object({
  error: z.object({
    code: z.enum([
      "bad_request",
      "unauthenticated",
      "forbidden",
      "not_found",
      "conflict",
      "too_large",
      "unsupported_type",
      "invalid",
      "rate_limited",
      "internal",
    ]),
    message: z.string(),
    issues: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});

const js = (schema: z.ZodType, io: "input" | "output") =>
  z.toJSONSchema(schema, { target: "draft-2020-12", io, unrepresentable: "any" });

/** An OpenAPI 3.1 document from the same zod schemas that validate the requests. */
export function buildOpenApi(ops: Operation[], info: { title: string; version: string; description: string }) {
  const paths: Record<string, Record<string, unknown>> = {};
  for (const op of ops) {
    const parameters = op.query
      ? Object.entries(op.query.shape).map(([name, s]) => ({
          name,
          in: "query",
          required: !(s as z.ZodType).safeParse(undefined).success,
          schema: js(s as z.ZodType, "input"),
        }))
      : [];
    const pathParams = [...op.path.matchAll(/\{(\w+)\}/g)].map((m) => ({
      name: m[1],
      in: "path",
      required: true,
      schema: { type: "string" },
    }));
    const responses: Record<string, unknown> = {
      [String(op.status ?? 200)]: {
        description: "Success",
        content: { [op.contentType ?? "application/json"]: { schema: js(op.response, "output") } },
      },
    };
    for (const code of op.errors ?? [422]) {
      responses[String(code)] = {
        description: "Error envelope",
        content: { "application/json": { schema: { $ref: "#/components/schemas/Error" } } },
      };
    }
    paths[op.path] ??= {};
    paths[op.path]![op.method] = {
      summary: op.summary,
      tags: op.tags,
      ...(op.auth ? { security: [{ session: [] }], description: `Requires the ${op.auth} role or higher.` } : {}),
      parameters: [...pathParams, ...parameters],
      ...(op.body
        ? { requestBody: { required: true, content: { "application/json": { schema: js(op.body, "input") } } } }
        : {}),
      responses,
    };
  }
  return {
    openapi: "3.1.0",
    info,
    paths,
    components: {
      schemas: { Error: js(errorSchema, "output") },
      securitySchemes: { session: { type: "apiKey", in: "cookie", name: "better-auth.session_token" } },
    },
  };
}
