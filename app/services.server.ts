import { createAuthenticator } from "~/auth/authenticator.server";
import { RateLimiter } from "~/auth/rate-limit.server";
import { createSessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import type { Env } from "~/env.server";
import type { Mailer } from "~/mail/mailer.server";

/** Everything a loader or action may reach, created once by the server and handed over per request. */
export function createServices(env: Env, db: Db, mailer: Mailer) {
  const signIn = {
    account: new RateLimiter(5, 15 * 60 * 1000),
    // A whole class may sit behind one school address, so the per-address limit is generous.
    address: new RateLimiter(100, 15 * 60 * 1000),
  };
  const reset = { account: new RateLimiter(3, 60 * 60 * 1000), address: new RateLimiter(30, 60 * 60 * 1000) };
  return {
    env,
    db,
    mailer,
    sessions: createSessionStorage(db, {
      secret: env.SESSION_SECRET,
      // Follows the address people use, so a laptop serving the class over plain http on the school Wi-Fi can sign students in.
      secure: new URL(env.PUBLIC_URL).protocol === "https:",
      maxDays: env.SESSION_MAX_DAYS,
      idleDays: env.SESSION_IDLE_DAYS,
    }),
    authenticator: createAuthenticator(db, signIn),
    // Reset mails are rare; a low per-account limit stops the form being used to flood an inbox.
    limits: { signIn, reset },
  };
}

export type Services = ReturnType<typeof createServices>;
