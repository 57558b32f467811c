import { getDb } from "./client";
import { seedDemo } from "./seed";
import { buildIfNeeded, checkDataDirFree, loadDotEnv, prepareDatabase, serve } from "./serve";
import { dataDir } from "@/features/shared/env";

// `npm run demo`: build if needed, start the database (migrated), seed the invented demo club (idempotent), serve.
let result;
let database;
try {
  loadDotEnv();
  checkDataDirFree();
  buildIfNeeded();
  database = await prepareDatabase();
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
try {
  result = await seedDemo(await getDb(), {
    password: process.env.DEMO_PASSWORD,
    reports: process.env.DEMO_REPORTS !== "0",
  });
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  await database.stop();
  process.exit(1);
}
console.log(`Demo club ready in ${dataDir()} (${result.reportsCreated} new demo reports).`);
await serve(database, (url) => {
  const width = Math.max(...result.accounts.map((a) => a.email.length));
  console.log(`\nTanklore demo is ready at ${url}\n`);
  console.log("Demo accounts (all invented), password for each:", result.password);
  for (const a of result.accounts) console.log(`  ${a.email.padEnd(width)}  ${a.role.padEnd(9)}  ${a.name}`);
  console.log("\nStop with Ctrl+C. Data stays in DATA_DIR; run again to continue where you left off.\n");
});
