import { buildIfNeeded, checkDataDirFree, loadDotEnv, prepareDatabase, serve } from "./serve";

// `npm start`: serve the app on the existing data. The embedded database starts in its own process and pending
// migrations are applied (under an advisory lock) before the app serves.
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
await serve(database, (url) => console.log(`\nTanklore is ready at ${url}\n`));
