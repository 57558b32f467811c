import "server-only";
import fs from "node:fs/promises";
import path from "node:path";
import { objectStorage, type ObjectStorage } from "@/features/shared/server/object-storage";

/** Where photo renditions live: under uploads/ in the club's object storage (the data directory or a bucket). */
export interface PhotoStorage {
  put(key: string, data: Buffer): Promise<void>;
  get(key: string): Promise<Buffer | null>;
  remove(key: string): Promise<void>;
}

export class DiskStorage implements PhotoStorage {
  constructor(private readonly root: string) {}
  private file(key: string): string {
    if (!/^[\w-]+(\/[\w.-]+)*$/.test(key)) throw new Error(`Bad storage key ${key}`);
    return path.join(this.root, key);
  }
  async put(key: string, data: Buffer): Promise<void> {
    const file = this.file(key);
    await fs.mkdir(path.dirname(file), { recursive: true });
    const tmp = `${file}.${process.pid}.tmp`;
    await fs.writeFile(tmp, data);
    await fs.rename(tmp, file);
  }
  async get(key: string): Promise<Buffer | null> {
    try {
      return await fs.readFile(this.file(key));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
      throw err;
    }
  }
  async remove(key: string): Promise<void> {
    await fs.rm(this.file(key), { force: true });
  }
}

/** Photo keys ("<report>/<id>-full.jpg") under uploads/ of the shared storage. */
class PrefixedStorage implements PhotoStorage {
  constructor(
    private readonly inner: ObjectStorage,
    private readonly prefix: string,
  ) {}
  put(key: string, data: Buffer): Promise<void> {
    return this.inner.put(this.prefix + key, data, "image/jpeg");
  }
  get(key: string): Promise<Buffer | null> {
    return this.inner.get(this.prefix + key);
  }
  remove(key: string): Promise<void> {
    return this.inner.remove(this.prefix + key);
  }
}

export function photoStorage(): PhotoStorage {
  return new PrefixedStorage(objectStorage(), "uploads/");
}
