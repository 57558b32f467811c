import "server-only";
import fs from "node:fs";
import fsp from "node:fs/promises";
import path from "node:path";
import {
  DeleteObjectCommand,
  GetObjectCommand,
  ListObjectsV2Command,
  NoSuchKey,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import { dataDir } from "@/features/shared/env";
import { getS3Env, type S3Env } from "./storage-env";

/**
 * Where the club's files live — photo renditions (uploads/…), backup archives (backups/…) and the local mail
 * catcher's messages (mail/…): the data directory by default, an S3-compatible bucket when S3_* is set, so
 * several app processes see the same files. Keys are forward-slash paths; the same key names the same file
 * in either place.
 */
export interface ObjectStorage {
  readonly kind: "disk" | "s3";
  put(key: string, data: Buffer, contentType?: string): Promise<void>;
  /** Stores a file from the local disk without reading it whole into memory (backups). */
  putFile(key: string, file: string, contentType?: string): Promise<void>;
  get(key: string): Promise<Buffer | null>;
  remove(key: string): Promise<void>;
  /** Objects under `prefix` (which ends with "/"), keys sorted. */
  list(prefix: string): Promise<{ key: string; bytes: number; modifiedAt: Date }[]>;
  /** Where the files are, for messages and the operations page. */
  describe(): string;
}

const KEY = /^[\w-]+(\/[\w.-]+)*$/;

function checkKey(key: string): string {
  if (!KEY.test(key) || key.split("/").some((s) => s === "." || s === "..")) throw new Error(`Bad storage key ${key}`);
  return key;
}

export class DiskObjectStorage implements ObjectStorage {
  readonly kind = "disk";
  constructor(private readonly root: string) {}
  private file(key: string): string {
    return path.join(this.root, checkKey(key));
  }
  async put(key: string, data: Buffer): Promise<void> {
    const file = this.file(key);
    await fsp.mkdir(path.dirname(file), { recursive: true });
    // Written aside and renamed, so a reader never sees half a file.
    const tmp = `${file}.${process.pid}.tmp`;
    await fsp.writeFile(tmp, data, { mode: 0o600 });
    await fsp.rename(tmp, file);
  }
  async putFile(key: string, from: string): Promise<void> {
    const file = this.file(key);
    if (path.resolve(from) === path.resolve(file)) return;
    await fsp.mkdir(path.dirname(file), { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    await fsp.copyFile(from, tmp);
    await fsp.rename(tmp, file);
  }
  async get(key: string): Promise<Buffer | null> {
    try {
      return await fsp.readFile(this.file(key));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
      throw err;
    }
  }
  async remove(key: string): Promise<void> {
    await fsp.rm(this.file(key), { force: true });
  }
  async list(prefix: string): Promise<{ key: string; bytes: number; modifiedAt: Date }[]> {
    const dir = path.join(this.root, prefix);
    if (!fs.existsSync(dir)) return [];
    const out: { key: string; bytes: number; modifiedAt: Date }[] = [];
    for (const e of await fsp.readdir(dir, { withFileTypes: true })) {
      if (!e.isFile() || e.name.startsWith(".") || e.name.endsWith(".tmp")) continue;
      const st = await fsp.stat(path.join(dir, e.name)).catch(() => null);
      if (st) out.push({ key: `${prefix}${e.name}`, bytes: st.size, modifiedAt: st.mtime });
    }
    return out.sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  }
  describe(): string {
    return `the data directory (${this.root})`;
  }
}

export class S3ObjectStorage implements ObjectStorage {
  readonly kind = "s3";
  private readonly client: S3Client;
  constructor(private readonly env: S3Env) {
    this.client = new S3Client({
      endpoint: env.S3_ENDPOINT,
      region: env.S3_REGION,
      credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
      forcePathStyle: env.S3_FORCE_PATH_STYLE === "on",
      // Checksums only where the API demands them: S3-compatible servers other than AWS often reject the
      // CRC32 headers recent SDKs add by default.
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
    });
  }
  async put(key: string, data: Buffer, contentType = "application/octet-stream"): Promise<void> {
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.env.S3_BUCKET,
        Key: checkKey(key),
        Body: data,
        ContentType: contentType,
        ContentLength: data.length,
      }),
    );
  }
  async putFile(key: string, file: string, contentType = "application/octet-stream"): Promise<void> {
    const { size } = await fsp.stat(file);
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.env.S3_BUCKET,
        Key: checkKey(key),
        Body: fs.createReadStream(file),
        ContentType: contentType,
        ContentLength: size,
      }),
    );
  }
  async get(key: string): Promise<Buffer | null> {
    try {
      const r = await this.client.send(new GetObjectCommand({ Bucket: this.env.S3_BUCKET, Key: checkKey(key) }));
      return Buffer.from(await r.Body!.transformToByteArray());
    } catch (err) {
      if (err instanceof NoSuchKey || (err instanceof S3ServiceException && err.$metadata.httpStatusCode === 404))
        return null;
      throw err;
    }
  }
  async remove(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.env.S3_BUCKET, Key: checkKey(key) }));
  }
  async list(prefix: string): Promise<{ key: string; bytes: number; modifiedAt: Date }[]> {
    const out: { key: string; bytes: number; modifiedAt: Date }[] = [];
    let token: string | undefined;
    do {
      const r = await this.client.send(
        new ListObjectsV2Command({ Bucket: this.env.S3_BUCKET, Prefix: prefix, ContinuationToken: token }),
      );
      for (const o of r.Contents ?? []) {
        // Only the objects directly under the prefix, as on disk.
        if (o.Key && !o.Key.slice(prefix.length).includes("/"))
          out.push({ key: o.Key, bytes: o.Size ?? 0, modifiedAt: o.LastModified ?? new Date(0) });
      }
      token = r.IsTruncated ? r.NextContinuationToken : undefined;
    } while (token);
    return out.sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
  }
  describe(): string {
    return `the bucket ${this.env.S3_BUCKET} at ${this.env.S3_ENDPOINT}`;
  }
}

const store = globalThis as unknown as { __tankloreStorage?: { sig: string; storage: ObjectStorage } };

/** The club's object storage (one client per process, rebuilt when the settings change, as tests do). */
export function objectStorage(): ObjectStorage {
  const s3 = getS3Env();
  const sig = s3 ? JSON.stringify(s3) : `disk:${dataDir()}`;
  if (store.__tankloreStorage?.sig !== sig) {
    store.__tankloreStorage = { sig, storage: s3 ? new S3ObjectStorage(s3) : new DiskObjectStorage(dataDir()) };
  }
  return store.__tankloreStorage.storage;
}
