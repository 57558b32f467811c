// Run as a child process by the lock and durability tests: opens DATA_DIR and writes rows,
// printing one line per acknowledged row, until killed.
import { sql } from "drizzle-orm";
import { getDb } from "@/db/client";

const mode = process.argv[2] ?? "open";
try {
  const db = await getDb();
  if (mode === "write") {
    await db.execute(sql`create table if not exists durability_probe (n int primary key)`);
    for (let n = 1; ; n++) {
      await db.execute(sql`insert into durability_probe (n) values (${n})`);
      process.stdout.write(`ack ${n}\n`);
      await new Promise((r) => setTimeout(r, 5));
    }
  }
  console.log("opened");
  process.exit(0);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  process.exit(3);
}
