import { closeDb, getDb } from "./client";
import { seedDemo } from "./seed";
import { buildIfNeeded, serve } from "./serve";
import { dataDir } from "@/features/shared/env";

// `npm run demo`: migrate, seed the invented demo club (idempotent), build if needed, serve.
let result;
try {
  const db = await getDb();
  result = await seedDemo(db, { password: process.env.DEMO_PASSWORD, reports: process.env.DEMO_REPORTS !== "0" });
  await closeDb();
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
console.log(`Demo club ready in ${dataDir()} (${result.reportsCreated} new demo reports).`);
buildIfNeeded();
await serve((url) => {
  const width = Math.max(...result.accounts.map((a) => a.email.length));
  console.log(`\nTanklore demo is ready at ${url}\n`);
  console.log("Demo accounts (all invented), password for each:", result.password);
  for (const a of result.accounts) console.log(`  ${a.email.padEnd(width)}  ${a.role.padEnd(9)}  ${a.name}`);
  console.log("\nStop with Ctrl+C. Data stays in DATA_DIR; run again to continue where you left off.\n");
});
