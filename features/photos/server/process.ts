import "server-only";
import sharp, { type Metadata } from "sharp";
import { AppError } from "@/features/shared/errors";
import { sniff } from "./sniff";

export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
export const MAX_PHOTO_PIXELS = 40_000_000;
const FULL_EDGE = 2048;
const THUMB_EDGE = 320;

// sharp's work is CPU- and memory-heavy: at most two images at a time, the rest wait their turn.
const slots = { free: 2, queue: [] as (() => void)[] };
async function withSlot<T>(fn: () => Promise<T>): Promise<T> {
  if (slots.free > 0) slots.free -= 1;
  else await new Promise<void>((r) => slots.queue.push(r));
  try {
    return await fn();
  } finally {
    const next = slots.queue.shift();
    if (next) next();
    else slots.free += 1;
  }
}

export interface Renditions {
  full: Buffer;
  thumb: Buffer;
  width: number;
  height: number;
}

/**
 * Checks the bytes, then re-encodes: upright (EXIF orientation applied), every metadata block
 * dropped (sharp keeps none unless asked, GPS included), a full and a thumbnail rendition as JPEG.
 */
export async function processPhoto(buf: Buffer): Promise<Renditions> {
  if (buf.length > MAX_PHOTO_BYTES)
    throw new AppError(
      "too_large",
      "Photos can be at most 10 MB. Save a smaller copy (2000 pixels across is plenty) and try again.",
    );
  const kind = sniff(buf);
  if (kind === "heic") {
    throw new AppError(
      "unsupported_type",
      "This is a HEIC/HEIF photo (the iPhone default), which Tanklore cannot read. On the phone choose Settings › Camera › Formats › Most Compatible, or export the photo as JPEG, then upload it again.",
    );
  }
  if (kind === "svg")
    throw new AppError("unsupported_type", "SVG drawings are not accepted; upload a photo as JPEG, PNG, WebP or AVIF.");
  if (kind === "gif")
    throw new AppError("unsupported_type", "GIF files are not accepted; upload a photo as JPEG, PNG, WebP or AVIF.");
  if (kind === "unknown")
    throw new AppError(
      "unsupported_type",
      "This file is not a JPEG, PNG, WebP or AVIF image (whatever its name says). Upload a photo in one of those formats.",
    );
  return withSlot(async () => {
    let meta: Metadata;
    try {
      meta = await sharp(buf, { limitInputPixels: false }).metadata();
    } catch {
      throw new AppError(
        "unsupported_type",
        "The image could not be read: it may be damaged or cut short. Try exporting it again.",
      );
    }
    const pixels = (meta.width ?? 0) * (meta.height ?? 0) * Math.max(1, meta.pages ?? 1);
    if (pixels > MAX_PHOTO_PIXELS) {
      throw new AppError(
        "too_large",
        `The image is ${Math.round(pixels / 1e6)} megapixels; the limit is 40. Save a smaller copy and try again.`,
      );
    }
    try {
      const input = () => sharp(buf, { limitInputPixels: MAX_PHOTO_PIXELS, failOn: "error", pages: 1 }).rotate();
      const full = await input()
        .resize({ width: FULL_EDGE, height: FULL_EDGE, fit: "inside", withoutEnlargement: true })
        .jpeg({ quality: 85, mozjpeg: true })
        .toBuffer({ resolveWithObject: true });
      const thumb = await input()
        .resize({ width: THUMB_EDGE, height: THUMB_EDGE, fit: "inside", withoutEnlargement: true })
        .jpeg({ quality: 80 })
        .toBuffer();
      return { full: full.data, thumb, width: full.info.width, height: full.info.height };
    } catch {
      throw new AppError(
        "unsupported_type",
        "The image could not be read: it may be damaged or cut short. Try exporting it again.",
      );
    }
  });
}
