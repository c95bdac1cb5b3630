import nodemailer, { type Transporter } from "nodemailer";

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  send(message: MailMessage): Promise<void>;
  close(): void;
}

export function createMailer(smtpUrl: string, from: string, local: boolean): Mailer {
  // The local fake speaks plain SMTP on loopback; a real relay given by SMTP_URL may use TLS.
  const transport: Transporter = local
    ? nodemailer.createTransport({ url: smtpUrl, ignoreTLS: true } as never)
    : nodemailer.createTransport(smtpUrl);
  return {
    async send(message) {
      await transport.sendMail({ from, to: message.to, subject: message.subject, text: message.text });
    },
    close: () => transport.close(),
  };
}
