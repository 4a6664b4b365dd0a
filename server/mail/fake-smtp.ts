import { randomUUID } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { InboxMessage } from '../../shared/schemas/audit.js';

/** How many messages the fake inbox keeps; older ones fall off. */
const INBOX_LIMIT = 200;

/**
 * A local SMTP server that accepts everything and keeps it in memory, so e-mail works on a machine
 * with no mail service and a developer or a test can read what was sent.
 */
export class FakeSmtpServer {
  readonly messages: InboxMessage[] = [];
  private server: SMTPServer | null = null;
  private waiters: (() => void)[] = [];

  /** Starts listening on 127.0.0.1 and returns the port. */
  async start(port = 0): Promise<number> {
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      banner: 'Holdline local test mail server',
      size: 5 * 1024 * 1024,
      onData: (stream, session, callback) => {
        simpleParser(stream)
          .then((mail) => {
            const to = session.envelope.rcptTo.map((r) => r.address);
            this.messages.unshift({ id: randomUUID(), at: new Date().toISOString(), to, subject: mail.subject ?? '', text: mail.text ?? '' });
            this.messages.splice(INBOX_LIMIT);
            for (const wake of this.waiters.splice(0)) wake();
            callback();
          })
          .catch((error: Error) => callback(error));
      },
    });
    this.server = server;
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(port, '127.0.0.1', () => resolve());
    });
    return (server.server.address() as AddressInfo).port;
  }

  /** Resolves when a message to `address` has arrived (tests). */
  async waitFor(address: string, timeoutMs = 5_000): Promise<InboxMessage> {
    const until = Date.now() + timeoutMs;
    for (;;) {
      const found = this.messages.find((m) => m.to.includes(address.toLowerCase()));
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
}
