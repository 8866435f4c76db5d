import { createAuthenticator } from "~/auth/authenticator.server";
import { RateLimiter } from "~/auth/rate-limit.server";
import { createSessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import type { Env } from "~/env.server";
import type { Mailer } from "~/mail/mailer.server";

/** Everything a loader or action may reach, created once by the server and handed over per request. */
export function createServices(env: Env, db: Db, mailer: Mailer) {
  const signInLimiter = new RateLimiter(5, 15 * 60 * 1000);
  return {
    env,
    db,
    mailer,
    sessions: createSessionStorage(env.SESSION_SECRET, env.NODE_ENV === "production"),
    authenticator: createAuthenticator(db, signInLimiter),
    limits: {
      signIn: signInLimiter,
      // Reset mails are sent rarely; a low limit stops the form being used to flood an inbox.
      reset: new RateLimiter(3, 60 * 60 * 1000),
    },
  };
}

export type Services = ReturnType<typeof createServices>;
