import path from "node:path";
import { pathToFileURL } from "node:url";
// Straight from the module, not the feature's index: a script needs none of the request-time code behind it.
import { restoreBackup, RestoreRefusedError, type RestoreResult } from "@/features/exchange/server/restore";
import { dataDir, getEnv } from "@/features/shared/env";

/** What a restore brought back, as the operator reads it. */
export function describeRestore(
  file: string,
  r: RestoreResult,
  target: { dataDir: string; databaseUrl?: string },
): string {
  const c = r.counts;
  const db =
    r.manifest.database.kind === "pglite"
      ? `${target.dataDir}/pgdata (embedded database)`
      : "the database at DATABASE_URL (pg_restore)";
  const lines = [
    `Restored ${path.basename(file)} (taken ${r.manifest.createdAt} by Tanklore ${r.manifest.appVersion}); every checksum matched.`,
    `  database: ${db}`,
    `  ${c.reports} reports, ${c.reportEvents} report events, ${c.evidenceSummaries} evidence summaries, ${c.users} accounts`,
    `  ${c.photos} photos: ${r.photoFiles} files in ${target.dataDir}/uploads`,
    `  session secret: ${r.manifest.authSecret.source === "file" ? `${target.dataDir}/auth-secret` : r.manifest.authSecret.source === "environment" ? "was BETTER_AUTH_SECRET (not in the archive)" : "none"}`,
    ...r.warnings.map((w) => `Warning: ${w}`),
    "Start the app on it with `npm start` (same DATA_DIR and DATABASE_URL).",
  ];
  return lines.join("\n");
}

// `npm run restore -- FILE`: restores a backup archive into an empty DATA_DIR (or the empty database at DATABASE_URL).
async function main(argv: string[]): Promise<number> {
  const file = argv[0];
  if (!file || argv.length > 1) {
    console.error(
      "Usage: npm run restore -- FILE   (restores into DATA_DIR, or DATABASE_URL when set; both must be empty)",
    );
    return 2;
  }
  try {
    const env = getEnv();
    const target = { dataDir: dataDir(), databaseUrl: env.DATABASE_URL, authSecretEnv: env.BETTER_AUTH_SECRET };
    const r = await restoreBackup(path.resolve(file), target);
    console.log(describeRestore(file, r, target));
    return 0;
  } catch (err) {
    console.error(
      err instanceof RestoreRefusedError ? err.message : `Restore failed: ${err instanceof Error ? err.message : err}`,
    );
    return 1;
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  process.exitCode = await main(process.argv.slice(2));
}
