/**
 * A fake SMTP server on loopback for development and tests: accepts every message, parses it and
 * stores it in mail_outbox, where GET /api/dev/mail and the tests read it. Never for production.
 */
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { Db } from '../db/client';
import { mailOutbox } from '../db/schema';
import { newId } from '../lib/ids';
import type { CapturedMail } from '../../shared/api/system';

export interface CaptureServer {
  port: number;
  /** smtp://127.0.0.1:<port> for createSmtpMailer */
  url: string;
  close(): Promise<void>;
}

/** A stored message as the dev mail page and the tests read it. */
export function toCapturedMail(m: typeof mailOutbox.$inferSelect): CapturedMail {
  return {
    id: m.id,
    from: m.fromAddress,
    to: m.toAddresses,
    subject: m.subject,
    text: m.textBody,
    html: m.htmlBody,
    createdAt: m.createdAt.toISOString(),
  };
}

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(a) ? a : a ? [a] : [];
  return list.flatMap((o) => o.value.map((v) => (v.address ?? '').toLowerCase())).filter(Boolean);
}

export function startCaptureServer(db: Db, port = 0, host = '127.0.0.1'): Promise<CaptureServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    banner: 'Slackline mail capture',
    disableReverseLookup: true,
    size: 5 * 1024 * 1024,
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', callback);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) =>
            db.insert(mailOutbox).values({
              id: newId(),
              fromAddress: (parsed.from?.value[0]?.address ?? '').slice(0, 320),
              toAddresses: addresses(parsed.to),
              subject: (parsed.subject ?? '').slice(0, 500),
              textBody: parsed.text ?? '',
              htmlBody: typeof parsed.html === 'string' ? parsed.html : null,
              raw: raw.toString('utf8'),
            }),
          )
          .then(() => callback())
          .catch((err: Error) => callback(err));
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      const addr = server.server.address();
      const actual = typeof addr === 'object' && addr ? addr.port : port;
      resolve({
        port: actual,
        url: `smtp://${host}:${actual}`,
        close: () => new Promise<void>((r) => server.close(() => r())),
      });
    });
  });
}
