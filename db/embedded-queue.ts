import type { PGlite } from "@electric-sql/pglite";

// Frontend message types (PostgreSQL protocol, section 55.7) that end a unit of work on one connection.
const SYNC = 0x53; // 'S'
const QUERY = 0x51; // 'Q'
const TERMINATE = 0x58; // 'X'
const SYNC_MESSAGE = new Uint8Array([SYNC, 0, 0, 0, 4]);

type SocketJob = {
  handlerId: number;
  message: Uint8Array;
  onData: (d: Uint8Array) => void;
  resolve: (n: number) => void;
  reject: (e: unknown) => void;
};
type InternalJob = {
  handlerId: 0;
  run: () => Promise<unknown>;
  resolve: (v: unknown) => void;
  reject: (e: unknown) => void;
};
type Job = SocketJob | InternalJob;

/**
 * The queue between the socket connections and PGlite's one backend. pglite-socket's own queue keeps a connection's
 * explicit transaction together, but interleaves the messages of the extended protocol (Parse, Bind, Execute, Sync)
 * from different connections, and they all share the one unnamed statement: with more than one client connection
 * a Bind could run another connection's Parse. Here one connection owns the backend from its first message until a
 * Sync or simple Query leaves it outside a transaction block; the others' messages wait. Drop-in for
 * pglite-socket's handler (same three methods).
 */
export class ExclusiveQueue {
  private jobs: Job[] = [];
  private owner: number | null = null;
  private running = false;

  constructor(private readonly db: PGlite) {}

  enqueue(handlerId: number, message: Uint8Array, onData: (d: Uint8Array) => void): Promise<number> {
    return new Promise((resolve, reject) => {
      this.jobs.push({ handlerId, message, onData, resolve, reject });
      void this.pump();
    });
  }

  /** Runs fn between units of work, never inside a connection's transaction (checkpoints, compaction). */
  exclusive<T>(run: () => Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.jobs.push({ handlerId: 0, run, resolve: resolve as (v: unknown) => void, reject });
      void this.pump();
    });
  }

  getQueueLength(): number {
    return this.jobs.length;
  }

  clearQueueForHandler(handlerId: number): void {
    this.jobs = this.jobs.filter((j) => {
      if (j.handlerId !== handlerId) return true;
      j.reject(new Error("Connection closed"));
      return false;
    });
  }

  /** A connection that went away mid-transaction (or mid-extended-query) must not leave the backend held. */
  async clearTransactionIfNeeded(handlerId: number): Promise<void> {
    if (this.owner !== handlerId) return;
    try {
      await this.db.runExclusive(() => this.db.execProtocolRawStream(SYNC_MESSAGE, { onRawData: () => {} }));
      if (this.db.isInTransaction()) await this.db.exec("ROLLBACK");
    } finally {
      this.owner = null;
      void this.pump();
    }
  }

  private next(): Job | undefined {
    if (this.owner === null) return this.jobs.shift();
    const i = this.jobs.findIndex((j) => j.handlerId === this.owner);
    return i < 0 ? undefined : this.jobs.splice(i, 1)[0];
  }

  private async pump(): Promise<void> {
    if (this.running) return;
    this.running = true;
    try {
      for (let job = this.next(); job; job = this.next()) await this.run(job);
    } finally {
      this.running = false;
    }
  }

  private async run(job: Job): Promise<void> {
    if ("run" in job) {
      try {
        job.resolve(await job.run());
      } catch (err) {
        job.reject(err);
      }
      return;
    }
    let bytes = 0;
    try {
      await this.db.runExclusive(() =>
        this.db.execProtocolRawStream(job.message, {
          onRawData: (d) => {
            bytes += d.length;
            job.onData(d);
          },
        }),
      );
      job.resolve(bytes);
    } catch (err) {
      job.reject(err);
    }
    const type = job.message[0];
    // The startup message has no type byte (its first byte is the length's high byte, 0).
    const endsUnit = type === SYNC || type === QUERY || type === TERMINATE || type === 0;
    this.owner = endsUnit && !this.db.isInTransaction() ? null : job.handlerId;
  }
}
