import nodemailer, { type Transporter } from 'nodemailer';
import type { Logger } from '../logger.js';
import { FakeSmtpServer } from './fake-smtp.js';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
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
 * Nodemailer over SMTP: to SMTP_URL when set, otherwise to a local fake server started on first
 * use (so booting the app never waits for mail).
 */
export function createMailer(smtpUrl: string | undefined, logger: Logger): Mailer {
  const fake = smtpUrl ? null : new FakeSmtpServer();
  let transport: Promise<Transporter> | null = null;

  const getTransport = () =>
    (transport ??= (async () => {
      if (smtpUrl) return nodemailer.createTransport(smtpUrl);
      const port = await fake!.start();
      logger.info({ port }, 'local test mail server listening');
      return nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
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
