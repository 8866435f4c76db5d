import { createAuthenticator } from "~/auth/authenticator.server";
import { createLimits } from "~/auth/rate-limit.server";
import { createSessionStorage } from "~/auth/session.server";
import { memoryShared, type Shared } from "~/cluster/shared.server";
import type { Db } from "~/db/client.server";
import type { Env } from "~/env.server";
import { createLogger } from "~/log.server";
import type { Mailer } from "~/mail/mailer.server";
import { createMailQueue } from "~/mail/queue.server";
import type { ReadScore } from "~/music/musicxml";

/**
 * Everything a loader or action may reach, created once by the server and handed over per request.
 * `shared` is what the nodes of a cluster share (Redis); one process keeps it in memory.
 */
export function createServices(env: Env, db: Db, mailer: Mailer, readScore: ReadScore, shared: Shared = memoryShared()) {
  const limits = createLimits(shared.limiter);
  const log = createLogger(env.LOG_LEVEL);
  return {
    env,
    db,
    mailer,
    log,
    /** Mail that must not delay (or time) the answer: see app/mail/queue.server.ts. */
    mailQueue: createMailQueue(mailer, log),
    /** Parses an uploaded score off the event loop (server/score-reader.ts). */
    readScore,
    sessions: createSessionStorage(db, {
      secret: env.SESSION_SECRET,
      // Follows the address people use, so a laptop serving the class over plain http on the school Wi-Fi can sign students in.
      secure: new URL(env.PUBLIC_URL).protocol === "https:",
      maxDays: env.SESSION_MAX_DAYS,
      idleDays: env.SESSION_IDLE_DAYS,
      cardMaxDays: env.CARD_SESSION_DAYS,
      cardIdleDays: env.CARD_SESSION_IDLE_DAYS,
    }),
    authenticator: createAuthenticator(db, limits.signIn),
    limits,
    /** News that a round changed, from whichever node stored it (the live class review listens). */
    rounds: shared.rounds,
  };
}

export type Services = ReturnType<typeof createServices>;
