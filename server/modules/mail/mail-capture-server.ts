/** The local SMTP stand-in: accepts every message (no TLS: STARTTLS is disabled, the client sets ignoreTLS) and keeps it in a Mailbox. */
import { simpleParser, type AddressObject } from 'mailparser';
import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import type { Mailbox } from './mailbox';

export interface MailCapture {
  host: string;
  port: number;
  close(): Promise<void>;
}

function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return '';
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ');
}

export function startMailCapture(options: { host: string; port: number; mailbox: Mailbox }): Promise<MailCapture> {
  const server = new SMTPServer({
    secure: false,
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          options.mailbox.add({
            from: addressText(parsed.from),
            to: addressText(parsed.to),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            receivedAt: new Date().toISOString(),
          });
          callback();
        })
        .catch((error: unknown) => callback(error instanceof Error ? error : new Error(String(error))));
    },
  });
  return new Promise((resolvePromise, reject) => {
    server.once('error', reject);
    server.listen(options.port, options.host, () => {
      server.off('error', reject);
      server.on('error', (error) => console.error('Mail stand-in error:', error));
      const address = server.server.address() as AddressInfo;
      resolvePromise({
        host: options.host,
        port: address.port,
        close: () => new Promise<void>((done) => server.close(() => done())),
      });
    });
  });
}
