import nodemailer, { type Transporter } from 'nodemailer';
import type { Logger } from 'pino';
import type { PeopleConfig } from '../accounts/people-config';
import { startFakeSmtpServer, type CapturedMessage } from './fake-smtp';

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
}

export interface Mailer {
  /** Sends one message; returns false (and logs) when the SMTP server refused it, so callers decide whether that matters. */
  send(mail: OutgoingMail): Promise<boolean>;
  /** messages caught by the local fake server; undefined when mail goes to a real SMTP server */
  captured: CapturedMessage[] | undefined;
  close(): Promise<void>;
}

/** Real SMTP when SMTP_URL is set; otherwise a local fake SMTP server on a loopback port that keeps the messages. */
export async function startMailer(config: PeopleConfig, logger: Logger): Promise<Mailer> {
  const fake = config.smtpUrl ? undefined : await startFakeSmtpServer();
  const transport: Transporter = fake
    ? nodemailer.createTransport({ host: '127.0.0.1', port: fake.port, secure: false, ignoreTLS: true })
    : nodemailer.createTransport(config.smtpUrl);
  if (fake) logger.info({ port: fake.port }, 'local mail catcher listening');

  return {
    async send(mail) {
      try {
        await transport.sendMail({ from: config.mailFrom, to: mail.to, subject: mail.subject, text: mail.text });
        return true;
      } catch (error) {
        logger.error({ err: error, subject: mail.subject }, 'mail was not sent');
        return false;
      }
    },
    captured: fake?.messages,
    async close() {
      transport.close();
      await fake?.close();
    },
  };
}
