import path from "node:path";
import { z } from "zod";

// The one place that reads process.env. Read at call time, not import time, so that
// tests and scripts can set variables before the first use.
const envSchema = z
  .object({
    NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
    DATA_DIR: z.string().min(1).default(".data"),
    DATABASE_URL: z
      .string()
      .regex(/^postgres(ql)?:\/\//, "DATABASE_URL must start with postgres:// or postgresql://")
      .optional(),
    BETTER_AUTH_URL: z.url().optional(),
    BETTER_AUTH_SECRET: z.string().min(32, "BETTER_AUTH_SECRET must be at least 32 characters").optional(),
    SMTP_URL: z
      .string()
      .regex(/^smtps?:\/\//, "SMTP_URL must start with smtp:// or smtps://")
      .optional(),
    MAIL_FROM: z.string().min(3).default("Tanklore <tanklore@example.org>"),
    MAIL_CATCHER_PORT: z.coerce.number().int().min(0).max(65535).default(0),
    RATE_LIMIT: z.enum(["on", "off"]).optional(),
    // How many reverse proxies in front of the app append to X-Forwarded-For; 0 trusts no forwarding header.
    TRUSTED_PROXY_HOPS: z.coerce
      .number()
      .int()
      .min(0, "TRUSTED_PROXY_HOPS is 0 or more.")
      .max(10, "TRUSTED_PROXY_HOPS is at most 10.")
      .default(0),
    // Set by Tanklore's own server (db/http-server.ts) for its process: it stamps each request with the socket's address.
    TANKLORE_PEER_HEADER: z.enum(["on"]).optional(),
    PORT: z.coerce.number().int().min(1).max(65535).default(3000),
    // Set by db/serve.ts for the app it starts: where the embedded database's own process listens, its control
    // address (for the backup's data-directory dump), and that migrations were applied before the app started.
    TANKLORE_EMBEDDED_DB_URL: z
      .string()
      .regex(/^postgres(ql)?:\/\//)
      .optional(),
    TANKLORE_EMBEDDED_DB_CONTROL: z.url().optional(),
    TANKLORE_MIGRATIONS: z.enum(["applied"]).optional(),
  })
  .superRefine((env, ctx) => {
    // Several processes on one PostgreSQL server must share the session secret and the public address: a
    // generated per-process secret would split sessions between them, so the start stops here instead.
    if (!env.DATABASE_URL) return;
    for (const key of ["BETTER_AUTH_SECRET", "BETTER_AUTH_URL"] as const) {
      if (!env[key])
        ctx.addIssue({ code: "custom", path: [key], message: `${key} is required when DATABASE_URL is set.` });
    }
  });

export type Env = z.infer<typeof envSchema>;

export function getEnv(): Env {
  const raw = Object.fromEntries(Object.entries(process.env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = envSchema.safeParse(raw);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Tanklore's environment is not valid:\n${lines.join("\n")}`);
  }
  return parsed.data;
}

export function dataDir(): string {
  return path.resolve(getEnv().DATA_DIR);
}

export function publicBaseUrl(): string {
  const env = getEnv();
  return (env.BETTER_AUTH_URL ?? `http://localhost:${env.PORT}`).replace(/\/$/, "");
}
