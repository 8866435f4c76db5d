import { createAuthenticator } from "~/auth/authenticator.server";
import { RateLimiter } from "~/auth/rate-limit.server";
import { createSessionStorage } from "~/auth/session.server";
import type { Db } from "~/db/client.server";
import type { Env } from "~/env.server";
import type { Mailer } from "~/mail/mailer.server";
import type { ReadScore } from "~/music/musicxml";

/** Everything a loader or action may reach, created once by the server and handed over per request. */
export function createServices(env: Env, db: Db, mailer: Mailer, readScore: ReadScore) {
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
    /** Parses an uploaded score off the event loop (server/score-reader.ts). */
    readScore,
    sessions: createSessionStorage(env.SESSION_SECRET, env.NODE_ENV === "production"),
    authenticator: createAuthenticator(db, signIn),
    // Reset mails are rare; a low per-account limit stops the form being used to flood an inbox.
    limits: { signIn, reset },
  };
}

export type Services = ReturnType<typeof createServices>;
