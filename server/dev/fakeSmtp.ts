/**
 * A local fake SMTP server for development and tests: it accepts every message on
 * 127.0.0.1 and keeps it in memory, so the demo's invitations and the tests can read
 * what was "sent". Never started in production.
 */
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { CapturedMail } from '../../shared/schemas/devMailbox';

export type { CapturedMail };

export interface FakeSmtp {
  port: number;
  messages: CapturedMail[];
  close(): Promise<void>;
}

export async function startFakeSmtp(port = 0, keep = 500): Promise<FakeSmtp> {
  const messages: CapturedMail[] = [];
  let next = 1;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const to = (Array.isArray(mail.to) ? mail.to : mail.to ? [mail.to] : []).flatMap((a) => a.value.map((v) => v.address ?? ''));
          messages.push({ id: next++, to, from: mail.from?.text ?? '', subject: mail.subject ?? '', text: mail.text ?? '', receivedAt: new Date().toISOString() });
          if (messages.length > keep) messages.shift();
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const actual = typeof address === 'object' && address ? address.port : port;
  return { port: actual, messages, close: () => new Promise((resolve) => server.close(() => resolve())) };
}
