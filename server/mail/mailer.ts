import nodemailer, { type Transporter } from 'nodemailer';
import type { Logger } from '../logger.js';
import { FakeSmtpServer } from './fake-smtp.js';

export interface MailAttachment {
  filename: string;
  contentType: string;
  content: Buffer;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  attachments?: MailAttachment[];
}

/** Sends e-mail. The only way the app reaches the outside world by mail. */
export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  /** The local fake server, when no real SMTP server is configured. */
  readonly fake: FakeSmtpServer | null;
  close(): Promise<void>;
}

const FROM = 'Holdline <no-reply@holdline.invalid>';

/**
 * A mail server that accepts the connection and then says nothing must not hold a send for
 * nodemailer's default two minutes: the outbox would wait behind it. Ten seconds to connect and
 * be greeted is plenty on a site network; a stalled transfer gives up after thirty.
 */
const TIMEOUTS = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 };

/**
 * Nodemailer over SMTP: to SMTP_URL when set, otherwise to a local fake server started on first
 * use (so booting the app never waits for mail). `inboxFolder` is where the fake server keeps what
 * it received (the data folder's `mail/`), so the test inbox survives a restart.
 */
export function createMailer(smtpUrl: string | undefined, logger: Logger, inboxFolder: string | null = null): Mailer {
  const fake = smtpUrl ? null : new FakeSmtpServer(inboxFolder);
  let transport: Promise<Transporter> | null = null;

  const getTransport = () =>
    (transport ??= (async () => {
      if (smtpUrl) return nodemailer.createTransport({ url: smtpUrl, ...TIMEOUTS });
      const port = await fake!.start();
      logger.info({ port }, 'local test mail server listening');
      return nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, ...TIMEOUTS });
    })());

  return {
    fake,
    async send(mail) {
      const t = await getTransport();
      await t.sendMail({ from: FROM, ...mail });
    },
    async close() {
      if (transport) (await transport).close();
      await fake?.stop();
    },
  };
}
