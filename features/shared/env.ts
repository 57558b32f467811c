import path from "node:path";
import { z } from "zod";

// The one place that reads process.env. Read at call time, not import time, so that
// tests and scripts can set variables before the first use.
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATA_DIR: z.string().min(1).default(".data"),
  DATABASE_URL: z
    .string()
    .regex(/^postgres(ql)?:\/\//, "DATABASE_URL must start with postgres:// or postgresql://")
    .optional(),
  BETTER_AUTH_URL: z.url().optional(),
  BETTER_AUTH_SECRET: z.string().min(32, "BETTER_AUTH_SECRET must be at least 32 characters").optional(),
  SMTP_URL: z.string().regex(/^smtps?:\/\//, "SMTP_URL must start with smtp:// or smtps://").optional(),
  MAIL_FROM: z.string().min(3).default("Tanklore <tanklore@example.org>"),
  MAIL_CATCHER_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  RATE_LIMIT: z.enum(["on", "off"]).optional(),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
});

export type Env = z.infer<typeof envSchema>;

export function getEnv(): Env {
  const raw = Object.fromEntries(
    Object.entries(process.env).filter(([, v]) => v !== undefined && v !== ""),
  );
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
