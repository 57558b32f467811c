// Run as a second app process by tests/integration/evidence-cache.test.ts: on the same PostgreSQL server, it listens
// for recomputes as the app does and prints its evidence cache version each time it changes, until killed.
import { evidenceCacheListening, evidenceCacheVersion, startEvidenceCacheListener } from "@/features/evidence/server";

startEvidenceCacheListener();
let last = "";
let ready = false;
for (;;) {
  if (!ready && evidenceCacheListening()) {
    ready = true;
    last = "";
    process.stdout.write("listening\n");
  }
  const v = await evidenceCacheVersion();
  if (v !== last) process.stdout.write(`version ${v}\n`);
  last = v;
  await new Promise((r) => setTimeout(r, 20));
}
