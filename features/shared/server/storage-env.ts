import { z } from "zod";

// The object-storage settings, apart from features/shared/env.ts: all five S3_* names together turn the bucket on;
// none keeps the data directory. Read at call time, like getEnv().
const s3Schema = z.object({
  S3_ENDPOINT: z.url("S3_ENDPOINT must be a URL such as http://127.0.0.1:9000 or https://s3.eu-west-1.amazonaws.com"),
  S3_BUCKET: z.string().min(3, "S3_BUCKET names the bucket (3 characters or more)"),
  S3_REGION: z.string().min(1),
  S3_ACCESS_KEY_ID: z.string().min(1),
  S3_SECRET_ACCESS_KEY: z.string().min(1),
  // Path-style addressing (http://host/bucket/key): needed by local endpoints; on unless set to "off".
  S3_FORCE_PATH_STYLE: z.enum(["on", "off"]).default("on"),
});

export type S3Env = z.infer<typeof s3Schema>;

const names = ["S3_ENDPOINT", "S3_BUCKET", "S3_REGION", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY"] as const;

/** The bucket's settings, or null when none of S3_* is set; a partial or invalid set stops with what to fix. */
export function getS3Env(env: Record<string, string | undefined> = process.env): S3Env | null {
  const set = names.filter((n) => env[n]);
  if (set.length === 0) return null;
  const raw = Object.fromEntries(
    Object.entries(env).filter(([k, v]) => k.startsWith("S3_") && v !== undefined && v !== ""),
  );
  const parsed = s3Schema.safeParse(raw);
  if (!parsed.success) {
    const missing = names.filter((n) => !env[n]);
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(
      `Tanklore's object-storage settings are not valid${missing.length ? ` (set all of ${names.join(", ")}, or none; missing: ${missing.join(", ")})` : ""}:\n${lines.join("\n")}`,
    );
  }
  return parsed.data;
}
