import { simpleParser } from "mailparser";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { SMTPServer } from "smtp-server";
import { SCHOOL_HEADER } from "~/mail/mailer.server";
import type { CapturedMail } from "~/mail/outbox.server";

/**
 * A local SMTP server on loopback for development and tests: every message is kept as a JSON
 * file (and the raw .eml) in `dir`, where the admin outbox page and the tests read it.
 */
export async function startMailCatcher(dir: string): Promise<{ url: string; close(): Promise<void> }> {
  mkdirSync(dir, { recursive: true });
  let counter = 0;
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    logger: false,
    async onData(stream, session, callback) {
      try {
        const chunks: Buffer[] = [];
        for await (const chunk of stream) chunks.push(chunk as Buffer);
        const raw = Buffer.concat(chunks);
        const parsed = await simpleParser(raw);
        const receivedAt = new Date().toISOString();
        const id = `${receivedAt.replace(/[:.]/g, "-")}-${process.pid}-${++counter}`;
        const mail: CapturedMail = {
          id,
          receivedAt,
          school: parsed.headers.get(SCHOOL_HEADER.toLowerCase())?.toString() ?? null,
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
          to: session.envelope.rcptTo.map((r) => r.address),
          subject: parsed.subject ?? "",
          text: parsed.text ?? "",
        };
        writeFileSync(join(dir, `${id}.eml`), raw);
        writeFileSync(join(dir, `${id}.json`), JSON.stringify(mail, null, 2));
        callback();
      } catch (error) {
        callback(error as Error);
      }
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => resolve());
  });
  const { port } = server.server.address() as { port: number };
  return {
    url: `smtp://127.0.0.1:${port}`,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
