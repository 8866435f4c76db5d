import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import type { Db } from "~/db/client.server";
import { clientAddress, firstRefusal, peek, take, type Limits } from "./rate-limit.server";
import { email } from "./schemas";
import { checkCredentials, normaliseEmail, type SessionUser } from "./users.server";

export const signInSchema = z.object({
  email,
  password: z.string().min(1, "Enter your password.").max(200, "That password is too long."),
});

/**
 * A refusal is a value, not an exception: the server creates the authenticator outside the
 * route bundle, so error classes would not be the same objects on both sides.
 */
export type SignInResult = { ok: true; user: SessionUser } | { ok: false; message: string; retryAfter?: number };

/** How long a sign-in to an account under attack from elsewhere waits: slowed, never refused. */
const ACCOUNT_SLOWDOWN_MS = 1000;

export function createAuthenticator(db: Db, limits: Limits["signIn"]) {
  const authenticator = new Authenticator<SignInResult>();
  authenticator.use(
    new FormStrategy(async ({ form, request }): Promise<SignInResult> => {
      const parsed = signInSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) return { ok: false, message: parsed.error.issues[0]!.message };
      const account = normaliseEmail(parsed.data.email);
      const address = clientAddress(request);
      const pair = `${account} ${address}`;
      // Only failures count, and only this account from this address (or this address's many
      // failures) is refused: a stranger's guesses elsewhere never lock the owner out.
      const refused = await firstRefusal([peek(limits.pair, pair), peek(limits.address, address)]);
      if (refused) return { ok: false, ...refused };
      if (await peek(limits.account, account)) await new Promise((done) => setTimeout(done, ACCOUNT_SLOWDOWN_MS));
      const user = await checkCredentials(db, account, parsed.data.password);
      if (!user) {
        await Promise.all([take(limits.pair, pair), take(limits.address, address), take(limits.account, account)]);
        return { ok: false, message: "That e-mail and password don't match an account." };
      }
      await limits.pair.limiter.delete(pair);
      return { ok: true, user };
    }),
    "form",
  );
  return authenticator;
}
