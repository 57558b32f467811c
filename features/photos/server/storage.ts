import "server-only";
import fs from "node:fs/promises";
import path from "node:path";
import { dataDir } from "@/features/shared/env";

/** Where photo renditions live; the disk today, an object store later behind the same three calls. */
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

export function photoStorage(): PhotoStorage {
  return new DiskStorage(path.join(dataDir(), "uploads"));
}
