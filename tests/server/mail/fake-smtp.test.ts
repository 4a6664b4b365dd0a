import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { inboxListSchema } from '../../../shared/schemas/audit.js';
import { FakeSmtpServer } from '../../../server/mail/fake-smtp.js';
import { signedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const folders: string[] = [];
const servers: FakeSmtpServer[] = [];
afterEach(async () => {
  for (const s of servers.splice(0)) await s.stop();
  for (const f of folders.splice(0)) rmSync(f, { recursive: true, force: true });
});

function tempFolder(): string {
  const folder = mkdtempSync(path.join(os.tmpdir(), 'holdline-inbox-'));
  folders.push(folder);
  return folder;
}

async function started(folder: string | null): Promise<{ fake: FakeSmtpServer; port: number }> {
  const fake = new FakeSmtpServer(folder);
  servers.push(fake);
  return { fake, port: await fake.start() };
}

const send = (port: number, mail: nodemailer.SendMailOptions) =>
  nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true }).sendMail({ from: 'test@holdline.invalid', ...mail });

describe('the local fake mail server', () => {
  it('keeps messages and their attachments in its folder, and reads them back after a restart', async () => {
    const folder = tempFolder();
    const first = await started(folder);
    const pdfBytes = Buffer.from('%PDF-1.4 invented bytes for the test\n%%EOF\n');
    await send(first.port, { to: 'Crew.Lead@example.test', subject: 'With a file', text: 'See attached.', attachments: [{ filename: 'record.pdf', content: pdfBytes, contentType: 'application/pdf' }] });
    await send(first.port, { to: 'second@example.test', subject: 'Plain', text: 'No file.' });
    await first.fake.stop();

    const again = new FakeSmtpServer(folder);
    servers.push(again);
    expect(again.messages.map((m) => m.subject)).toEqual(['Plain', 'With a file']);
    const withFile = again.messages[1]!;
    expect(withFile.to).toEqual(['crew.lead@example.test']);
    expect(withFile.attachments).toEqual([{ filename: 'record.pdf', contentType: 'application/pdf', size: pdfBytes.length }]);
    expect(again.attachmentContent(withFile.id, 0).equals(pdfBytes)).toBe(true);
    expect(again.messages[0]!.attachments).toEqual([]);

    // And it keeps receiving on top of what it read back.
    const port = await again.start();
    await send(port, { to: 'third@example.test', subject: 'After the restart', text: 'Hello.' });
    expect((await again.waitFor('third@example.test')).subject).toBe('After the restart');
    expect(again.messages).toHaveLength(3);
  });

  it('answers 550 to every recipient when told to refuse, and the sender sees the refusal', async () => {
    const { fake, port } = await started(null);
    fake.refuseEverything = true;
    await expect(send(port, { to: 'nobody@example.test', subject: 'Refused', text: 'x' })).rejects.toThrow(/550/);
    expect(fake.messages).toHaveLength(0);
  });

  it('skips a half-written last line instead of failing to start', async () => {
    const folder = tempFolder();
    const first = await started(folder);
    await send(first.port, { to: 'a@example.test', subject: 'Whole', text: 'x' });
    await first.fake.stop();
    const { appendFileSync } = await import('node:fs');
    appendFileSync(path.join(folder, 'inbox.jsonl'), '{"id":"cut-off-mid');
    const again = new FakeSmtpServer(folder);
    expect(again.messages.map((m) => m.subject)).toEqual(['Whole']);
  });
});

describe('the admin’s test inbox across a restart of the app', () => {
  let server: TestServer | null = null;
  afterEach(async () => {
    await server?.stop();
    server = null;
  });

  it('GET /api/dev/inbox still lists a message received before the restart', async () => {
    server = await startTestServer({ env: { HOLDLINE_TEST_INBOX: '1' } });
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    await server.context.mailer.send({ to: 'site.office@example.test', subject: 'Kept over a restart', text: 'Body' });
    const dataDir = server.dataDir;
    await server.close();

    server = await startTestServer({ env: { HOLDLINE_TEST_INBOX: '1' }, dataDir });
    const res = await request(server.app).get('/api/dev/inbox').set('Authorization', `Bearer ${admin.token}`).expect(200);
    const items = inboxListSchema.parse(res.body).items;
    expect(items.map((m) => m.subject)).toContain('Kept over a restart');
  });
});
