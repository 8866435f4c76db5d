import { createAuthenticator } from "~/auth/authenticator.server";
import { createLimits } from "~/auth/rate-limit.server";
import { createSessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import type { Env } from "~/env.server";
import { createLogger } from "~/log.server";
import type { Mailer } from "~/mail/mailer.server";
import { createMailQueue } from "~/mail/queue.server";

/** Everything a loader or action may reach, created once by the server and handed over per request. */
export function createServices(env: Env, db: Db, mailer: Mailer) {
  const limits = createLimits();
  const log = createLogger(env.LOG_LEVEL);
  return {
    env,
    db,
    mailer,
    log,
    /** Mail that must not delay (or time) the answer: see app/mail/queue.server.ts. */
    mailQueue: createMailQueue(mailer, log),
    sessions: createSessionStorage(db, {
      secret: env.SESSION_SECRET,
      // Follows the address people use, so a laptop serving the class over plain http on the school Wi-Fi can sign students in.
      secure: new URL(env.PUBLIC_URL).protocol === "https:",
      maxDays: env.SESSION_MAX_DAYS,
      idleDays: env.SESSION_IDLE_DAYS,
    }),
    authenticator: createAuthenticator(db, limits.signIn),
    limits,
  };
}

export type Services = ReturnType<typeof createServices>;
