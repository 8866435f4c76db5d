import nodemailer, { type Transporter } from "nodemailer";

export interface OutgoingMail {
  /** The school the message is sent for, or null for system mail (sign-up, password reset) that belongs to no school's outbox. */
  orgId: string | null;
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/** Names a message's school, so the captured outbox can show each school only its own mail. */
export const SCHOOL_HEADER = "X-Fretcall-School";

/** Sends through SMTP: a real provider in production, the local catcher in development and tests. */
export function createMailer(smtpUrl: string, from: string): Mailer {
  const transport: Transporter = nodemailer.createTransport(smtpUrl);
  return {
    async send({ orgId, ...mail }) {
      await transport.sendMail({ from, ...mail, headers: orgId ? { [SCHOOL_HEADER]: orgId } : undefined });
    },
    close() {
      transport.close();
    },
  };
}
