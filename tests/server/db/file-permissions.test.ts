import { randomUUID } from 'node:crypto';
import { chmodSync, mkdirSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { DataSource } from 'typeorm';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openDatabase } from '../../../server/db/data-source.js';
import { createLogger } from '../../../server/logger.js';
import { createMailer } from '../../../server/mail/mailer.js';
import { LocalDiskStorage } from '../../../server/storage/local-disk.js';

/**
 * The database (password and refresh-token hashes, every record) and the photos are for the
 * server's user only (issue 18: the database file was world-readable): folders Holdline creates
 * are 0700, the database and its -wal and -shm files 0600, photos 0600 in a 0700 folder, and so
 * the local test inbox.
 */
describe('files on disk are for the server’s user only', () => {
  let dir: string;
  let dataSource: DataSource | undefined;
  const modeOf = (file: string) => statSync(file).mode & 0o777;

  beforeEach(() => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-perm-'));
  });
  afterEach(async () => {
    if (dataSource?.isInitialized) await dataSource.destroy();
    dataSource = undefined;
    rmSync(dir, { recursive: true, force: true });
  });

  it('creates the data folders 0700 and the database with its -wal and -shm 0600', async () => {
    const file = path.join(dir, 'site', 'data', 'holdline.sqlite');
    dataSource = await openDatabase(file);
    await dataSource.query('CREATE TABLE t (n INTEGER)');
    await dataSource.query('INSERT INTO t VALUES (1)');
    expect([modeOf(path.join(dir, 'site')), modeOf(path.dirname(file))]).toEqual([0o700, 0o700]);
    expect([file, `${file}-wal`, `${file}-shm`].map(modeOf)).toEqual([0o600, 0o600, 0o600]);
  });

  it('takes group and other access away from a database an earlier version left readable, leaving an existing folder as it is', async () => {
    const shared = path.join(dir, 'shared');
    mkdirSync(shared, { mode: 0o755 });
    chmodSync(shared, 0o755);
    const file = path.join(shared, 'holdline.sqlite');
    dataSource = await openDatabase(file);
    await dataSource.destroy();
    chmodSync(file, 0o644);
    dataSource = await openDatabase(file);
    await dataSource.query('CREATE TABLE t (n INTEGER)');
    expect([file, `${file}-wal`, `${file}-shm`].map(modeOf)).toEqual([0o600, 0o600, 0o600]);
    expect(modeOf(shared)).toBe(0o755);
  });

  it('stores photos 0600 in a 0700 folder, and tightens an uploads folder left open to others', async () => {
    const fresh = new LocalDiskStorage(path.join(dir, 'data', 'uploads'));
    const name = `${randomUUID()}.jpg`;
    await fresh.put(name, Buffer.from('photo'));
    expect([modeOf(path.join(dir, 'data', 'uploads')), modeOf(path.join(dir, 'data', 'uploads', name))]).toEqual([0o700, 0o600]);

    const old = path.join(dir, 'old-uploads');
    mkdirSync(old);
    chmodSync(old, 0o755);
    await new LocalDiskStorage(old).put(`${randomUUID()}.png`, Buffer.from('photo'));
    expect(modeOf(old)).toBe(0o700);
  });

  it('keeps the local test inbox (sign-in links, records) for the server’s user only', async () => {
    const folder = path.join(dir, 'data', 'mail');
    const mailer = createMailer(undefined, createLogger('silent'), folder);
    try {
      await mailer.send({ to: 'crew@holdline.test', subject: 'Reset your password', text: 'A link', attachments: [{ filename: 'record.pdf', contentType: 'application/pdf', content: Buffer.from('%PDF-1.7') }] });
      const [message] = mailer.fake!.messages;
      expect(modeOf(folder)).toBe(0o700);
      expect(modeOf(path.join(folder, 'inbox.jsonl'))).toBe(0o600);
      expect(modeOf(path.join(folder, 'attachments', message!.id))).toBe(0o700);
      expect(modeOf(path.join(folder, 'attachments', message!.id, '0'))).toBe(0o600);
    } finally {
      await mailer.close();
    }
  });
});
