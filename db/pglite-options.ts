import { PGlite, type PGliteOptions } from "@electric-sql/pglite";

/**
 * Options for every PGlite this app opens on a data directory. PGlite runs PostgreSQL single-user, which has no
 * checkpointer: the write-ahead log is written out only by an explicit CHECKPOINT (the database process runs one a
 * minute, the import one at its end). After a checkpoint PostgreSQL keeps old segments for reuse up to a size set by
 * max_wal_size/min_wal_size — 1 GB/80 MB by default, which after a bulk load left 700 MB of WAL beside 375 MB of data.
 * With these bounds a checkpoint removes what is past them, so the directory stays near its live data.
 */
export const EMBEDDED_WAL_PARAMS = ["-c", "max_wal_size=64MB", "-c", "min_wal_size=32MB"] as const;

export function pgliteOptions(extra: PGliteOptions = {}): PGliteOptions {
  return { ...extra, startParams: [...PGlite.defaultStartParams, ...EMBEDDED_WAL_PARAMS] };
}
