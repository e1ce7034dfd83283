import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { parseMessage } from './mime';

/** One message as the fake server received it: the SMTP envelope and the parsed content. */
export interface CapturedMessage {
  id: number;
  receivedAt: string;
  envelope: { from: string; to: string[] };
  from: string;
  to: string;
  subject: string;
  text: string;
}

export interface FakeSmtpServer {
  port: number;
  messages: CapturedMessage[];
  close(): Promise<void>;
}

/** Keeps at most this many messages, newest last, so a long development session does not grow without end. */
const KEEP = 500;

/** A local SMTP server on a loopback port that keeps every message in memory (development and tests). */
export async function startFakeSmtpServer(): Promise<FakeSmtpServer> {
  const messages: CapturedMessage[] = [];
  let nextId = 1;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    banner: 'Sylvasift local mail catcher',
    size: 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        const parsed = parseMessage(Buffer.concat(chunks).toString('utf8'));
        const mailFrom = session.envelope.mailFrom;
        messages.push({
          id: nextId++,
          receivedAt: new Date().toISOString(),
          envelope: { from: mailFrom ? mailFrom.address : '', to: session.envelope.rcptTo.map((r) => r.address) },
          from: parsed.from,
          to: parsed.to,
          subject: parsed.subject,
          text: parsed.text,
        });
        if (messages.length > KEEP) messages.splice(0, messages.length - KEEP);
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const address = server.server.address() as AddressInfo;
  return {
    port: address.port,
    messages,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
