import { mkdir, open, unlink, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { assertStoredName, type Storage, type StoredFile } from './index.js';

function isErrno(err: unknown, code: string): boolean {
  return typeof err === 'object' && err !== null && (err as NodeJS.ErrnoException).code === code;
}

/** Files in one folder on the local disk, e.g. `<dataDir>/uploads/`. */
export class LocalDiskStorage implements Storage {
  readonly folder: string;

  constructor(folder: string) {
    this.folder = path.resolve(folder);
  }

  private pathOf(name: string): string {
    assertStoredName(name);
    return path.join(this.folder, name);
  }

  async put(name: string, bytes: Buffer): Promise<void> {
    const file = this.pathOf(name);
    // Created on first use so a fresh data folder needs no setup step.
    await mkdir(this.folder, { recursive: true });
    // 'wx': fail instead of overwriting; a uuid clash would otherwise replace someone's photo.
    await writeFile(file, bytes, { flag: 'wx', mode: 0o640 });
  }

  async get(name: string): Promise<StoredFile | null> {
    const file = this.pathOf(name);
    try {
      // Opening first turns "missing" into a null here instead of a stream error mid-response.
      const handle = await open(file, 'r');
      try {
        const { size } = await handle.stat();
        // The stream closes the handle when it ends or is destroyed.
        return { stream: handle.createReadStream(), sizeBytes: size };
      } catch (err) {
        await handle.close();
        throw err;
      }
    } catch (err) {
      if (isErrno(err, 'ENOENT')) return null;
      throw err;
    }
  }

  async remove(name: string): Promise<void> {
    try {
      await unlink(this.pathOf(name));
    } catch (err) {
      if (!isErrno(err, 'ENOENT')) throw err;
    }
  }
}
