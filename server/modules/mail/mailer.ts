/** Sending mail: nodemailer over SMTP, or straight into a Mailbox (tests). */
import nodemailer from 'nodemailer';
import type { Mailbox } from './mailbox';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

export interface SmtpSettings {
  host: string;
  port: number;
  secure: boolean;
  user?: string;
  pass?: string;
  from: string;
  /** For the local stand-in, which offers no STARTTLS. */
  ignoreTLS?: boolean;
}

export function smtpMailer(settings: SmtpSettings): Mailer {
  const transport = nodemailer.createTransport({
    host: settings.host,
    port: settings.port,
    secure: settings.secure,
    ignoreTLS: settings.ignoreTLS ?? false,
    auth: settings.user ? { user: settings.user, pass: settings.pass ?? '' } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: settings.from, ...mail });
    },
    close() {
      transport.close();
    },
  };
}

/** Delivers into a Mailbox without SMTP (for tests that do not need the network path). */
export function mailboxMailer(mailbox: Mailbox, from: string): Mailer {
  return {
    async send(mail) {
      mailbox.add({ from, to: mail.to, subject: mail.subject, text: mail.text, html: mail.html });
    },
    close() {},
  };
}
