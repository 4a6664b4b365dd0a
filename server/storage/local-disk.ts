import { chmod, mkdir, open, stat, unlink, writeFile } from 'node:fs/promises';
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
    await this.ensureFolder();
    // 'wx': fail instead of overwriting; a uuid clash would otherwise replace someone's photo.
    // 0600: the photos are records, for the server's user only.
    await writeFile(file, bytes, { flag: 'wx', mode: 0o600 });
  }

  private folderReady = false;

  /**
   * Created on first use so a fresh data folder needs no setup step, for the server's user only
   * (0700); a folder an earlier version made readable to others is tightened on the first write.
   */
  private async ensureFolder(): Promise<void> {
    await mkdir(this.folder, { recursive: true, mode: 0o700 });
    if (this.folderReady) return;
    const mode = (await stat(this.folder)).mode & 0o777;
    if (mode & 0o077) await chmod(this.folder, mode & 0o700);
    this.folderReady = true;
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
