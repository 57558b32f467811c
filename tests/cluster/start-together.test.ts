import { afterAll, expect, it } from "vitest";
import { startCluster, type Cluster } from "@/db/cluster";
import { connect } from "./support";

let cluster: Cluster | undefined;
afterAll(async () => {
  await cluster?.stop();
});

// Two processes launched at the same moment on an empty database: the migrations are applied once, under the
// lock, and both answer /api/health.
it("brings up two processes started together on an empty database", async () => {
  cluster = await startCluster({ together: true });
  for (const app of cluster.apps) expect((await fetch(`${app.url}/api/health`)).status).toBe(200);
  const { db, close } = connect(cluster.pg.url);
  try {
    const r = (await db.execute("select count(*)::int as n from drizzle.__drizzle_migrations")) as unknown as {
      rows: { n: number }[];
    };
    const files = (await import("node:fs")).readdirSync("drizzle").filter((f) => f.endsWith(".sql")).length;
    expect(r.rows[0]!.n).toBe(files);
  } finally {
    await close();
  }
}, 300_000);
