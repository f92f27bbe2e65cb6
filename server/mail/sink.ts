/**
 * The in-process SMTP sink (MAIL_SINK=on): an smtp-server on loopback that accepts every message,
 * parses it with mailparser and stores it in the `mails` table, where GET /api/outbox shows it.
 * The SMTP "250 OK" is sent only after the row is stored, so a resolved `sendMail` means the mail
 * is in the outbox.
 */
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { Executor } from '../db/client.ts';
import { insertMail } from '../modules/outbox/queries.ts';

export interface MailSink {
  port: number;
  close(): Promise<void>;
}

function addressText(address: AddressObject | AddressObject[] | undefined): string {
  if (!address) return '';
  return (Array.isArray(address) ? address : [address]).map((a) => a.text).join(', ');
}

/** Start the sink on `host:port` (port 0 picks a free one). */
export function startMailSink(db: Executor, options: { host?: string; port: number }): Promise<MailSink> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) =>
            insertMail(db, {
              from: addressText(parsed.from),
              to: addressText(parsed.to),
              subject: parsed.subject ?? '',
              text: parsed.text ?? '',
              html: typeof parsed.html === 'string' ? parsed.html : null,
              raw: raw.toString('utf8'),
            }),
          )
          .then(
            () => callback(),
            (error: Error) => callback(error),
          );
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port, options.host ?? '127.0.0.1', () => {
      server.off('error', reject);
      server.on('error', (error) => console.error('mail sink error:', error.message));
      resolve({
        port: (server.server.address() as AddressInfo).port,
        close: () => new Promise<void>((done) => server.close(() => done())),
      });
    });
  });
}
