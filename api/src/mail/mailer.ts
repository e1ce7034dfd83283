import nodemailer, { type Transporter } from 'nodemailer';
import type { Logger } from 'pino';
import { startFakeSmtpServer, type CapturedMessage } from './fake-smtp';

/** Outgoing mail (config section `mail`). */
export interface MailConfig {
  /** real SMTP server (smtp:// or smtps://); unset in development and test means the local fake server */
  smtpUrl: string | undefined;
  /** From: address of every message */
  from: string;
  /** base URL for links in e-mail, without a trailing slash */
  publicUrl: string;
}

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
export async function startMailer(config: MailConfig, logger: Logger): Promise<Mailer> {
  const fake = config.smtpUrl ? undefined : await startFakeSmtpServer();
  const transport: Transporter = fake
    ? nodemailer.createTransport({ host: '127.0.0.1', port: fake.port, secure: false, ignoreTLS: true })
    : nodemailer.createTransport(config.smtpUrl);
  if (fake) logger.info({ port: fake.port }, 'local mail catcher listening');

  return {
    async send(mail) {
      try {
        await transport.sendMail({ from: config.from, to: mail.to, subject: mail.subject, text: mail.text });
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
