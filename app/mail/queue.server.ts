import type { Logger } from "pino";
import type { Mailer, OutgoingMail } from "./mailer.server";

/**
 * Mail is sent after the answer has gone out, one message at a time: how long the mail provider
 * takes can't be timed from outside (it would tell whether an address has an account), and a slow
 * provider never holds a page up. A failed send is logged; the sender can ask again.
 */
export function createMailQueue(mailer: Mailer, log: Logger) {
  let tail: Promise<void> = Promise.resolve();
  const later = (work: () => Promise<unknown>) => {
    tail = tail
      .then(() => new Promise<void>((next) => setImmediate(next)))
      .then(work)
      .then(
        () => undefined,
        (error: unknown) => log.error({ err: error }, "queued e-mail failed"),
      );
  };
  return {
    /** Queues one message. */
    send(mail: OutgoingMail) {
      later(() => mailer.send(mail));
    },
    /** Queues other mail work (a batch of invitations). */
    later,
    /** Resolves once everything queued so far is sent (or has failed). */
    idle: () => tail,
  };
}

export type MailQueue = ReturnType<typeof createMailQueue>;
