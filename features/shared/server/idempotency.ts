import crypto from "node:crypto";
import { and, eq, gt, sql } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { AppError } from "../errors";
import { json } from "./http";

const { idempotencyKeys } = schema;
type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** How long a key answers with its first response. */
export const IDEMPOTENCY_WINDOW_MS = 24 * 60 * 60 * 1000;

/** A key a creating function claims inside its own transaction, and answers with. */
export interface IdempotencyClaim {
  memberId: string;
  key: string;
  requestHash: string;
  status: number;
}

interface Stored {
  requestHash: string;
  status: number;
  body: unknown;
}

/** Thrown inside the creating transaction when another request already used the key: rolls back, then replays. */
export class IdempotentReplay extends Error {
  constructor(readonly stored: Stored) {
    super("idempotent replay");
  }
}

const cutoff = () => new Date(Date.now() - IDEMPOTENCY_WINDOW_MS);

/**
 * The same key with a different request is refused with 422, as the IETF draft "The Idempotency-Key HTTP Header
 * Field" (draft-ietf-httpapi-idempotency-key-header, section 2.7) advises: the request is well-formed, but the
 * key cannot apply to it. (409 there means the first request is still being processed, which cannot be seen
 * here: a key is stored only with its committed creation.)
 */
function mismatch(): AppError {
  return new AppError(
    "invalid",
    "This Idempotency-Key was already used for a different request; use a new key for a new request.",
    [{ path: "Idempotency-Key", message: "Already used with another body within the last 24 hours." }],
  );
}

function answer(stored: Stored, hash: string): Response {
  if (stored.requestHash !== hash) throw mismatch();
  return json(stored.body, { status: stored.status, headers: { "idempotent-replayed": "true" } });
}

/** First thing in the creating transaction: take the key, or find it taken (then this transaction rolls back). */
export async function claimIdempotencyKey(tx: Tx, claim: IdempotencyClaim | undefined): Promise<void> {
  if (!claim) return;
  const taken = await tx
    .insert(idempotencyKeys)
    .values({
      memberId: claim.memberId,
      key: claim.key,
      requestHash: claim.requestHash,
      status: claim.status,
      body: null,
    })
    // An expired key is free again; a live one stays as it is (on PostgreSQL a concurrent claim waits for ours).
    .onConflictDoUpdate({
      target: [idempotencyKeys.memberId, idempotencyKeys.key],
      set: { requestHash: claim.requestHash, status: claim.status, body: null, createdAt: sql`now()` },
      setWhere: sql`${idempotencyKeys.createdAt} < ${cutoff().toISOString()}::timestamptz`,
    })
    .returning({ key: idempotencyKeys.key });
  if (taken.length) return;
  const [stored] = await tx
    .select()
    .from(idempotencyKeys)
    .where(and(eq(idempotencyKeys.memberId, claim.memberId), eq(idempotencyKeys.key, claim.key)));
  throw new IdempotentReplay(stored!);
}

/** Last thing in the creating transaction: the response the key answers with from now on. */
export async function storeIdempotentResponse(
  tx: Tx,
  claim: IdempotencyClaim | undefined,
  body: unknown,
): Promise<void> {
  if (!claim) return;
  await tx
    .update(idempotencyKeys)
    .set({ body: body as object })
    .where(and(eq(idempotencyKeys.memberId, claim.memberId), eq(idempotencyKeys.key, claim.key)));
}

/** A stable hash of what a request asks for: method, path and its parsed content (key order ignored). */
export function requestHash(req: Request, content: unknown): string {
  const url = new URL(req.url);
  return crypto
    .createHash("sha256")
    .update(`${req.method} ${url.pathname}\n${canonicalJson(content)}`)
    .digest("hex");
}

/** JSON with object keys sorted at every depth, so equal content hashes alike whatever its key order. */
export function canonicalJson(value: unknown): string {
  const canonical = (v: unknown): unknown =>
    Array.isArray(v)
      ? v.map(canonical)
      : v && typeof v === "object"
        ? Object.fromEntries(
            Object.keys(v)
              .sort()
              .map((k) => [k, canonical((v as Record<string, unknown>)[k])]),
          )
        : v;
  return JSON.stringify(canonical(value));
}

/** The request's Idempotency-Key, if any: 1–255 visible ASCII characters. */
export function idempotencyKeyOf(req: Request): string | undefined {
  const key = req.headers.get("idempotency-key");
  if (key === null) return undefined;
  if (!/^[\x21-\x7e]{1,255}$/.test(key)) {
    throw new AppError(
      "invalid",
      "The Idempotency-Key header must be 1 to 255 visible ASCII characters (a UUID works well).",
      [{ path: "Idempotency-Key", message: "1 to 255 visible ASCII characters." }],
    );
  }
  return key;
}

/**
 * Runs a creating request once per (member, Idempotency-Key) within 24 h. `create` gets the claim and must call
 * claimIdempotencyKey first and storeIdempotentResponse last inside its transaction. Without the header it just runs.
 */
export async function idempotent<T>(
  req: Request,
  memberId: string,
  content: unknown,
  status: number,
  create: (claim: IdempotencyClaim | undefined) => Promise<T>,
): Promise<Response> {
  const key = idempotencyKeyOf(req);
  if (!key) return json(await create(undefined), status);
  const hash = requestHash(req, content);
  const db = await getDb();
  const [stored] = await db
    .select()
    .from(idempotencyKeys)
    .where(
      and(
        eq(idempotencyKeys.memberId, memberId),
        eq(idempotencyKeys.key, key),
        gt(idempotencyKeys.createdAt, cutoff()),
      ),
    );
  if (stored) return answer(stored, hash);
  try {
    return json(await create({ memberId, key, requestHash: hash, status }), status);
  } catch (err) {
    if (err instanceof IdempotentReplay) return answer(err.stored, hash);
    throw err;
  }
}
