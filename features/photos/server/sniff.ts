import "server-only";
// Identifies an image by its first bytes, never by its name or declared type.
export type ImageKind = "jpeg" | "png" | "webp" | "avif" | "heic" | "gif" | "svg" | "unknown";

export function sniff(buf: Buffer): ImageKind {
  if (buf.length >= 3 && buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return "jpeg";
  if (buf.length >= 8 && buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])))
    return "png";
  if (buf.length >= 12 && buf.toString("latin1", 0, 4) === "RIFF" && buf.toString("latin1", 8, 12) === "WEBP")
    return "webp";
  if (buf.length >= 12 && buf.toString("latin1", 4, 8) === "ftyp") {
    const brands = buf.toString("latin1", 8, Math.min(buf.length, 8 + 64));
    if (/avif|avis/.test(brands)) return "avif";
    if (/heic|heix|hevc|hevx|heim|heis|mif1|msf1/.test(brands)) return "heic";
  }
  if (buf.length >= 6 && /^GIF8[79]a/.test(buf.toString("latin1", 0, 6))) return "gif";
  const head = buf.toString("utf8", 0, Math.min(buf.length, 512)).trimStart().toLowerCase();
  if (head.startsWith("<svg") || (head.startsWith("<?xml") && head.includes("<svg"))) return "svg";
  return "unknown";
}
