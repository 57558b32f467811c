import net from "node:net";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as jobsRoute from "@/app/api/admin/jobs/route";
import * as reportsRoute from "@/app/api/reports/route";
import { getDb, schema } from "@/db/client";
import { seedCatalogue } from "@/features/catalogue/server";
import { sendModeratorDigests } from "@/features/review/server";
import { enqueueJob, kickJobs, registerJob, runDueJobs, settleJobs } from "@/features/shared/server/jobs";
import { call } from "../support/http";
import { reportBody, signedInUser } from "../support/factories";

const { jobs, moderatorDigests } = schema;

beforeAll(async () => {
  await seedCatalogue(await getDb());
});

describe("jobs claimed in the database", () => {
  it("retries a failing job with growing delays, then keeps it as failed with its error for admins", async () => {
    let runs = 0;
    registerJob("test-always-fails", {
      maxAttempts: 3,
      backoffMs: (attempt) => 1000 * 2 ** (attempt - 1),
      run: async () => {
        runs += 1;
        throw new Error("the far end refused");
      },
    });
    await enqueueJob("test-always-fails", { to: "someone@example.org" }, { dedupeKey: "test-fail-1" });
    const db = await getDb();
    const row = async () => (await db.select().from(jobs).where(eq(jobs.dedupeKey, "test-fail-1")))[0]!;
    const t0 = new Date(Date.now() + 1000);
    expect(await runDueJobs({ kinds: ["test-always-fails"], now: t0 })).toBe(1);
    let r = await row();
    expect([r.status, r.attempts, r.lastError]).toEqual(["queued", 1, "Error: the far end refused"]);
    expect(r.runAt.getTime() - t0.getTime()).toBe(1000);
    // Not due again before its delay is over.
    expect(await runDueJobs({ kinds: ["test-always-fails"], now: new Date(t0.getTime() + 999) })).toBe(0);
    expect(await runDueJobs({ kinds: ["test-always-fails"], now: new Date(t0.getTime() + 1000) })).toBe(1);
    r = await row();
    expect(r.runAt.getTime() - (t0.getTime() + 1000)).toBe(2000);
    expect(await runDueJobs({ kinds: ["test-always-fails"], now: new Date(t0.getTime() + 3000) })).toBe(1);
    r = await row();
    expect([r.status, r.attempts]).toEqual(["failed", 3]);
    expect(await runDueJobs({ kinds: ["test-always-fails"], now: new Date(t0.getTime() + 3_600_000) })).toBe(0);
    expect(runs).toBe(3);

    const admin = await signedInUser("admin");
    const listed = await call(jobsRoute.GET, "/api/admin/jobs", { cookie: admin.cookie });
    expect(listed.status).toBe(200);
    const failed = listed.body.failing.find((j: { id: string }) => j.id === r.id);
    expect(failed).toMatchObject({
      kind: "test-always-fails",
      status: "failed",
      attempts: 3,
      lastError: "Error: the far end refused",
      summary: { to: "someone@example.org" },
    });
    const member = await signedInUser("member");
    expect((await call(jobsRoute.GET, "/api/admin/jobs", { cookie: member.cookie })).status).toBe(403);
    // An admin queues it again.
    const retried = await call(jobsRoute.POST, "/api/admin/jobs", { cookie: admin.cookie, body: { retry: r.id } });
    expect(retried.body).toEqual({ retried: r.id });
    const bad = await call(jobsRoute.POST, "/api/admin/jobs", { cookie: admin.cookie, body: { run: "no-such-round" } });
    expect(bad.status).toBe(422);
  });

  it("runs a job once when two runners poll at the same moment", async () => {
    let runs = 0;
    registerJob("test-once", { run: async () => void (runs += 1) });
    await enqueueJob("test-once", {}, { dedupeKey: "test-once-1" });
    expect(await enqueueJob("test-once", {}, { dedupeKey: "test-once-1" })).toBe(false);
    const now = new Date(Date.now() + 1000);
    const counts = await Promise.all([
      runDueJobs({ kinds: ["test-once"], now }),
      runDueJobs({ kinds: ["test-once"], now }),
    ]);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(1);
    expect(runs).toBe(1);
  });

  it("finishes a job that queues more work and kicks the runner from inside it (a reminder round sending mails)", async () => {
    const ran: string[] = [];
    registerJob("test-follow-up", { run: async () => void ran.push("follow-up") });
    registerJob("test-kicker", {
      run: async () => {
        await enqueueJob("test-follow-up", {}, { dedupeKey: "test-follow-up-1" });
        // Awaited, as the reminder round did: before the fix this waited on the very run it was part of.
        await kickJobs(["test-follow-up"]);
        ran.push("kicker");
      },
    });
    await enqueueJob("test-kicker", {}, { dedupeKey: "test-kicker-1" });
    const stalled = Symbol("stalled");
    const outcome = await Promise.race([
      kickJobs(["test-kicker", "test-follow-up"]).then(() => settleJobs()),
      new Promise((r) => setTimeout(() => r(stalled), 5_000)),
    ]);
    expect(outcome).not.toBe(stalled);
    expect(ran).toEqual(["kicker", "follow-up"]);
    const db = await getDb();
    for (const key of ["test-kicker-1", "test-follow-up-1"])
      expect((await db.select().from(jobs).where(eq(jobs.dedupeKey, key)))[0]!.status, key).toBe("done");
  });

  it("takes over a job whose runner died once its lease runs out", async () => {
    let runs = 0;
    registerJob("test-lease", { leaseMs: 60_000, run: async () => void (runs += 1) });
    await enqueueJob("test-lease", {}, { dedupeKey: "test-lease-1" });
    const db = await getDb();
    const now = new Date();
    // As a process that claimed it and was killed: running, held by someone else until a minute from now.
    await db
      .update(jobs)
      .set({ status: "running", attempts: 1, lockedBy: "gone:1", lockedUntil: new Date(now.getTime() + 60_000) })
      .where(eq(jobs.dedupeKey, "test-lease-1"));
    expect(await runDueJobs({ kinds: ["test-lease"], now: new Date(now.getTime() + 30_000) })).toBe(0);
    expect(await runDueJobs({ kinds: ["test-lease"], now: new Date(now.getTime() + 61_000) })).toBe(1);
    expect(runs).toBe(1);
    expect((await db.select().from(jobs).where(eq(jobs.dedupeKey, "test-lease-1")))[0]!.status).toBe("done");
  });

  it("does not mark a moderator's digest sent when the mail server refuses it", async () => {
    const mod = await signedInUser("moderator");
    const member = await signedInUser("member");
    const filed = await call(reportsRoute.POST, "/api/reports", {
      cookie: member.cookie,
      body: reportBody({ submit: true }),
    });
    expect(filed.body.status, JSON.stringify(filed.body)).toBe("awaiting_review");
    // A mail server that is not there: a port that was free a moment ago.
    const port = await new Promise<number>((resolve) => {
      const s = net.createServer().listen(0, "127.0.0.1", () => {
        const p = (s.address() as net.AddressInfo).port;
        s.close(() => resolve(p));
      });
    });
    const store = globalThis as unknown as { __tankloreMail?: unknown };
    const saved = store.__tankloreMail;
    store.__tankloreMail = undefined;
    process.env.SMTP_URL = `smtp://127.0.0.1:${port}`;
    try {
      await expect(sendModeratorDigests(new Date())).rejects.toThrow(/could not be sent/);
    } finally {
      delete process.env.SMTP_URL;
      store.__tankloreMail = saved;
    }
    const db = await getDb();
    const [row] = await db.select().from(moderatorDigests).where(eq(moderatorDigests.userId, mod.id));
    expect(row!.lastSentAt.getTime()).toBe(0);
    expect(row!.claimedUntil).toBeNull();
    // With the mail server back, the next round sends it.
    expect(await sendModeratorDigests(new Date())).toBeGreaterThanOrEqual(1);
    const [after] = await db.select().from(moderatorDigests).where(eq(moderatorDigests.userId, mod.id));
    expect(after!.lastSentAt.getTime()).toBeGreaterThan(0);
  });
});
