/**
 * Outgoing mail through nodemailer over SMTP. The accounts work fills this in
 * (fake SMTP server in development and tests); this is the interface.
 */
export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}
export interface Mailer {
  send(message: MailMessage): Promise<void>;
  close(): Promise<void>;
}

/** A mailer that drops mail (used only where no mail is wanted, e.g. benchmarks). */
export const nullMailer: Mailer = { send: async () => {}, close: async () => {} };
