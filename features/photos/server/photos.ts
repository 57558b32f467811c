import "server-only";
import crypto from "node:crypto";
import { count, eq } from "drizzle-orm";
import { getDb, schema, type Db } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import type { Actor } from "@/features/shared/roles";
import { getVisibleReportRow, lockEditable, recordEvent } from "@/features/reports/server";
import { readBody } from "@/features/shared/server/http";
import {
  claimIdempotencyKey,
  storeIdempotentResponse,
  type IdempotencyClaim,
} from "@/features/shared/server/idempotency";
import { MAX_PHOTO_BYTES, processPhoto } from "./process";
import { photoStorage } from "./storage";

const MAX_PHOTOS_PER_REPORT = 12;
export const stages = ["before", "during", "after"] as const;

/** Reads a multipart body up to the photo limit (plus form overhead) and returns its `file` field. */
export async function readUpload(req: Request): Promise<{ file: Buffer; stage: string }> {
  const limit = MAX_PHOTO_BYTES + 64 * 1024;
  const type = req.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data"))
    throw new AppError(
      "unsupported_type",
      "Send the photo as multipart/form-data with the file in the field named file.",
    );
  const body = await readBody(req, limit, "Photos can be at most 10 MB. Save a smaller copy and try again.");
  if (body.length === 0) throw new AppError("bad_request", "The upload was empty.");
  let form: FormData;
  try {
    form = await new Response(new Uint8Array(body), { headers: { "content-type": type } }).formData();
  } catch {
    throw new AppError(
      "bad_request",
      "The upload could not be read as a form; send the photo in the field named file.",
    );
  }
  const file = form.get("file");
  if (!file || typeof file === "string")
    throw new AppError("invalid", "No photo was attached.", [
      { path: "file", message: "Attach the photo in the field named file." },
    ]);
  const stage = String(form.get("stage") ?? "during");
  return { file: Buffer.from(await file.arrayBuffer()), stage };
}

const tooManyPhotos = () =>
  new AppError("conflict", `A report holds at most ${MAX_PHOTOS_PER_REPORT} photos; remove one first.`);

async function countPhotos(db: Pick<Db, "select">, reportId: string): Promise<number> {
  const [row] = await db.select({ n: count() }).from(schema.photos).where(eq(schema.photos.reportId, reportId));
  return row?.n ?? 0;
}

export async function addPhoto(
  actor: Actor | null,
  reportId: string,
  file: Buffer,
  stage: string,
  idempotency?: IdempotencyClaim,
) {
  if (!actor) throw new AppError("unauthenticated", "Sign in to add photos.");
  const report = await getVisibleReportRow(actor, reportId);
  if (report.authorId !== actor.id)
    throw new AppError("forbidden", "Only the member who filed a report may add its photos.");
  if (!["draft", "returned"].includes(report.status))
    throw new AppError("conflict", "Photos can be added while the report is a draft or returned for changes.");
  if (!(stages as readonly string[]).includes(stage))
    throw new AppError("invalid", "Some fields need fixing; see issues.", [
      { path: "stage", message: "stage must be before, during or after." },
    ]);
  const db = await getDb();
  // A quick refusal before the costly image work; the count that counts is taken under the lock below.
  if ((await countPhotos(db, reportId)) >= MAX_PHOTOS_PER_REPORT) throw tooManyPhotos();
  const r = await processPhoto(file);
  const id = crypto.randomUUID();
  const storage = photoStorage();
  const fullKey = `${reportId}/${id}-full.jpg`;
  const thumbKey = `${reportId}/${id}-thumb.jpg`;
  await storage.put(fullKey, r.full);
  await storage.put(thumbKey, r.thumb);
  const result = { id, width: r.width, height: r.height, bytes: r.full.length, stage };
  try {
    // The photo, its event and any Idempotency-Key commit together (a replay rolls them back and drops the files).
    await db.transaction(async (tx) => {
      await claimIdempotencyKey(tx, idempotency);
      // Parallel uploads to one report queue on its row (FOR UPDATE; PGlite runs one transaction at a time anyway),
      // so each counts the photos the others stored and the limit holds.
      const locked = await lockEditable(
        tx,
        reportId,
        ["draft", "returned"],
        "Photos can be added while the report is a draft or returned for changes.",
      );
      if ((await countPhotos(tx, reportId)) >= MAX_PHOTOS_PER_REPORT) throw tooManyPhotos();
      await tx.insert(schema.photos).values({
        id,
        reportId,
        uploaderId: actor.id,
        stage,
        width: r.width,
        height: r.height,
        bytes: r.full.length,
        fullKey,
        thumbKey,
      });
      await recordEvent(tx, {
        reportId,
        actorId: actor.id,
        action: "photo_added",
        from: locked.status,
        to: locked.status,
        note: stage,
      });
      await storeIdempotentResponse(tx, idempotency, result);
    });
  } catch (err) {
    await storage.remove(fullKey);
    await storage.remove(thumbKey);
    throw err;
  }
  return result;
}

/** A stored rendition, for whoever may see the photo's report; everyone else gets 404. */
export async function getPhotoFile(actor: Actor | null, photoId: string, size: "thumb" | "full"): Promise<Buffer> {
  const db = await getDb();
  const [photo] = await db.select().from(schema.photos).where(eq(schema.photos.id, photoId));
  if (!photo) throw notFound("That photo");
  await getVisibleReportRow(actor, photo.reportId).catch(() => {
    throw notFound("That photo");
  });
  const data = await photoStorage().get(size === "thumb" ? photo.thumbKey : photo.fullKey);
  if (!data) throw notFound("That photo's file");
  return data;
}

export async function removePhoto(actor: Actor | null, photoId: string) {
  if (!actor) throw new AppError("unauthenticated", "Sign in to remove photos.");
  const db = await getDb();
  const [photo] = await db.select().from(schema.photos).where(eq(schema.photos.id, photoId));
  if (!photo) throw notFound("That photo");
  const report = await getVisibleReportRow(actor, photo.reportId).catch(() => {
    throw notFound("That photo");
  });
  if (report.authorId !== actor.id)
    throw new AppError("forbidden", "Only the member who filed a report may remove its photos.");
  if (!["draft", "returned"].includes(report.status))
    throw new AppError("conflict", "Photos can be removed while the report is a draft or returned.");
  await db.transaction(async (tx) => {
    // Checked again under the report's lock: a removal racing a submit must not change a submitted report.
    await lockEditable(
      tx,
      photo.reportId,
      ["draft", "returned"],
      "Photos can be removed while the report is a draft or returned.",
    );
    await tx.delete(schema.photos).where(eq(schema.photos.id, photoId));
  });
  await photoStorage().remove(photo.fullKey);
  await photoStorage().remove(photo.thumbKey);
  return { id: photoId, deleted: true };
}
