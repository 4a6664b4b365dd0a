import { randomUUID } from 'node:crypto';
import type { Readable } from 'node:stream';

/** The file kinds we store; the extension is part of every generated name. */
export const storedExtensions = ['jpg', 'png', 'webp'] as const;
export type StoredExtension = (typeof storedExtensions)[number];

// A lowercase v4-shaped uuid and one of our extensions: nothing else ever reaches a disk path,
// so a client-supplied name (`../../etc/passwd.jpg`) cannot even be expressed.
const NAME = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}\.(jpg|png|webp)$/;

/** A fresh storage name: a random uuid and the extension. */
export function newStoredName(extension: StoredExtension): string {
  return `${randomUUID()}.${extension}`;
}

/** Whether a name has the exact shape `newStoredName` produces. */
export function isStoredName(name: string): boolean {
  return NAME.test(name);
}

/** Thrown when a caller passes a name the storage did not generate. */
export class StoredNameError extends Error {
  constructor(name: string) {
    super(`Refusing storage name ${JSON.stringify(name.slice(0, 100))}: only generated names are allowed.`);
  }
}

/** Throws unless `name` is a generated storage name. */
export function assertStoredName(name: string): void {
  if (!isStoredName(name)) throw new StoredNameError(name);
}

/** An opened stored file. */
export interface StoredFile {
  stream: Readable;
  sizeBytes: number;
}

/** Where photo bytes live. Small on purpose, so a bucket can replace the local disk later. */
export interface Storage {
  /** Writes a new file; never overwrites an existing one. */
  put(name: string, bytes: Buffer): Promise<void>;
  /** Opens a file for reading; null when it does not exist. */
  get(name: string): Promise<StoredFile | null>;
  /** Deletes a file; a missing file is not an error (cleanup may run twice). */
  remove(name: string): Promise<void>;
}
