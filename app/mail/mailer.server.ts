import nodemailer, { type Transporter } from "nodemailer";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/** Sends through SMTP: a real provider in production, the local catcher in development and tests. */
export function createMailer(smtpUrl: string, from: string): Mailer {
  const transport: Transporter = nodemailer.createTransport(smtpUrl);
  return {
    async send(mail) {
      await transport.sendMail({ from, ...mail });
    },
    close() {
      transport.close();
    },
  };
}
