import fs from "node:fs";
import path from "node:path";
import S3rver from "s3rver";

/**
 * `npm run s3:local`: a local S3-compatible server (s3rver, from the registry) for trying the several-process
 * shape and for the tests — not for keeping a club's files. Listens on 127.0.0.1:S3_PORT (default 9000), keeps
 * its objects in S3_DIR (default .data/s3) and creates S3_BUCKET (default tanklore). Prints the S3_* settings
 * that point the app at it.
 */
export interface LocalS3 {
  endpoint: string;
  env: Record<string, string>;
  close: () => Promise<void>;
}

export async function startLocalS3(
  opts: { port?: number; dir?: string; bucket?: string; silent?: boolean } = {},
): Promise<LocalS3> {
  const port = opts.port ?? 9000;
  const dir = path.resolve(opts.dir ?? ".data/s3");
  const bucket = opts.bucket ?? "tanklore";
  fs.mkdirSync(dir, { recursive: true });
  // s3rver accepts any signed request whose key pair is S3RVER/S3RVER.
  const server = new S3rver({
    port,
    address: "127.0.0.1",
    directory: dir,
    silent: opts.silent ?? true,
    configureBuckets: [{ name: bucket, configs: [] }],
  });
  const info = await server.run();
  const endpoint = `http://127.0.0.1:${info.port}`;
  return {
    endpoint,
    env: {
      S3_ENDPOINT: endpoint,
      S3_BUCKET: bucket,
      S3_REGION: "us-east-1",
      S3_ACCESS_KEY_ID: "S3RVER",
      S3_SECRET_ACCESS_KEY: "S3RVER",
    },
    close: () => server.close(),
  };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  const port = Number(process.env.S3_PORT ?? 9000);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    console.error("S3_PORT must be a port number (1–65535).");
    process.exit(1);
  }
  const s3 = await startLocalS3({ port, dir: process.env.S3_DIR, bucket: process.env.S3_BUCKET, silent: false });
  console.log(
    `\nA local S3-compatible server is listening at ${s3.endpoint}, keeping objects in ${path.resolve(process.env.S3_DIR ?? ".data/s3")}.`,
  );
  console.log("Point Tanklore at it with:\n");
  for (const [k, v] of Object.entries(s3.env)) console.log(`  ${k}=${v}`);
  console.log("\nCtrl+C stops it.");
  for (const sig of ["SIGINT", "SIGTERM"] as const)
    process.on(sig, () => void s3.close().finally(() => process.exit(0)));
}
