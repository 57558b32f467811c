import { buildIfNeeded, checkDataDirFree, serve } from "./serve";

// `npm start`: serve the app on the existing data (migrations apply on first use).
try {
  checkDataDirFree();
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
}
buildIfNeeded();
await serve((url) => console.log(`\nTanklore is ready at ${url}\n`));
