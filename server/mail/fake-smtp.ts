import { randomUUID } from 'node:crypto';
import { appendFileSync, existsSync, mkdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer, type SMTPServerDataStream } from 'smtp-server';
import { inboxMessageSchema, type InboxMessage } from '../../shared/schemas/audit.js';

/** How many messages the fake inbox keeps; older ones fall off. */
const INBOX_LIMIT = 200;
const INBOX_FILE = 'inbox.jsonl';

/** An error the SMTP server sends back as its answer. */
class SmtpRefusal extends Error {
  constructor(
    message: string,
    readonly responseCode: number,
  ) {
    super(message);
  }
}

/**
 * A local SMTP server that accepts everything and keeps it, so e-mail works on a machine with no
 * mail service and a developer, the admin's test inbox or a test can read what was sent.
 *
 * With a folder, every message is appended to `<folder>/inbox.jsonl` and its attachments are
 * written to `<folder>/attachments/<message id>/<n>`, so the inbox survives a restart. Without
 * one (a test that only needs a mail server), it keeps messages in memory.
 */
export class FakeSmtpServer {
  readonly messages: InboxMessage[] = [];
  /** Set by tests to make the server answer 550 to every recipient, as a mail server that refuses does. */
  refuseEverything = false;
  private server: SMTPServer | null = null;
  private waiters: (() => void)[] = [];
  private appended = 0;

  constructor(private readonly folder: string | null = null) {
    if (folder) this.load(folder);
  }

  /** Starts listening on 127.0.0.1 and returns the port. */
  async start(port = 0): Promise<number> {
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      banner: 'Holdline local test mail server',
      size: 20 * 1024 * 1024,
      onRcptTo: (_address, _session, callback) => {
        if (this.refuseEverything) callback(new SmtpRefusal('Mailbox unavailable (refused by the test mail server)', 550));
        else callback();
      },
      onData: (stream, session, callback) => {
        this.receive(stream, session.envelope.rcptTo.map((r) => r.address.toLowerCase())).then(
          () => callback(),
          (error: Error) => callback(error),
        );
      },
    });
    this.server = server;
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(port, '127.0.0.1', () => resolve());
    });
    return (server.server.address() as AddressInfo).port;
  }

  /** The bytes of a stored attachment (tests, and a later download if one is wanted). */
  attachmentContent(messageId: string, index: number): Buffer {
    if (!this.folder) throw new Error('this test mail server keeps no files');
    return readFileSync(path.join(this.folder, 'attachments', messageId, String(index)));
  }

  /** Resolves when a message to `address` has arrived (tests). */
  async waitFor(address: string, timeoutMs = 5_000, match: (m: InboxMessage) => boolean = () => true): Promise<InboxMessage> {
    const until = Date.now() + timeoutMs;
    for (;;) {
      const found = this.messages.find((m) => m.to.includes(address.toLowerCase()) && match(m));
      if (found) return found;
      if (Date.now() > until) throw new Error(`no e-mail to ${address} within ${timeoutMs} ms`);
      await new Promise<void>((resolve) => {
        this.waiters.push(resolve);
        setTimeout(resolve, 100);
      });
    }
  }

  async stop(): Promise<void> {
    const server = this.server;
    this.server = null;
    if (server) await new Promise<void>((resolve) => server.close(() => resolve()));
  }

  private async receive(stream: SMTPServerDataStream, to: string[]): Promise<void> {
    const mail = await simpleParser(stream);
    const id = randomUUID();
    const attachments = mail.attachments.map((a, i) => ({ filename: a.filename ?? `attachment-${i + 1}`, contentType: a.contentType, size: a.content.length }));
    if (this.folder) {
      const dir = path.join(this.folder, 'attachments', id);
      // For the server's user only: sign-in links and records pass through here.
      if (mail.attachments.length) mkdirSync(dir, { recursive: true, mode: 0o700 });
      mail.attachments.forEach((a, i) => writeFileSync(path.join(dir, String(i)), a.content, { mode: 0o600 }));
    }
    const message: InboxMessage = { id, at: new Date().toISOString(), to, subject: mail.subject ?? '', text: mail.text ?? '', attachments };
    this.messages.unshift(message);
    this.persist(message);
    for (const wake of this.waiters.splice(0)) wake();
  }

  /** Reads the kept messages back, newest first; a damaged line (a crash mid-write) is skipped. */
  private load(folder: string): void {
    mkdirSync(folder, { recursive: true, mode: 0o700 });
    const file = path.join(folder, INBOX_FILE);
    if (!existsSync(file)) return;
    const kept: InboxMessage[] = [];
    for (const line of readFileSync(file, 'utf8').split('\n')) {
      if (!line.trim()) continue;
      try {
        const parsed = inboxMessageSchema.safeParse(JSON.parse(line));
        if (parsed.success) kept.push(parsed.data);
      } catch {
        // A half-written last line: the message it held was never acknowledged to the sender.
      }
    }
    this.messages.push(...kept.reverse().slice(0, INBOX_LIMIT));
    this.appended = Math.max(0, kept.length - INBOX_LIMIT);
  }

  /** Appends one message; once the file holds twice the limit, it is rewritten with the newest ones. */
  private persist(message: InboxMessage): void {
    const dropped = this.messages.splice(INBOX_LIMIT);
    if (!this.folder) return;
    const file = path.join(this.folder, INBOX_FILE);
    appendFileSync(file, `${JSON.stringify(message)}\n`, { mode: 0o600 });
    this.appended += 1;
    for (const old of dropped) rmSync(path.join(this.folder, 'attachments', old.id), { recursive: true, force: true });
    if (this.appended < INBOX_LIMIT) return;
    this.appended = 0;
    const temporary = `${file}.${process.pid}.tmp`;
    writeFileSync(temporary, [...this.messages].reverse().map((m) => `${JSON.stringify(m)}\n`).join(''), { mode: 0o600 });
    renameSync(temporary, file);
  }
}
