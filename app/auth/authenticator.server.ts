import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import type { Db } from "~/db/client.server";
import { email } from "./schemas";
import { checkLimits, clientAddress, type RateLimiter } from "./rate-limit.server";
import { checkCredentials, normaliseEmail, type SessionUser } from "./users.server";

/** A sign-in refusal whose message is safe to show the person signing in. */
export class SignInError extends Error {}

export const signInSchema = z.object({
  email,
  password: z.string().min(1, "Enter your password.").max(200, "That password is too long."),
});

export function createAuthenticator(db: Db, limiter: RateLimiter) {
  const authenticator = new Authenticator<SessionUser>();
  authenticator.use(
    new FormStrategy(async ({ form, request }) => {
      const parsed = signInSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) throw new SignInError(parsed.error.issues[0]!.message);
      const email = normaliseEmail(parsed.data.email);
      const accountKey = `account:${email}`;
      const wait = checkLimits(limiter, [accountKey, `address:${clientAddress(request)}`]);
      if (wait > 0) throw new SignInError(`Too many sign-in attempts. Try again in ${Math.ceil(wait / 60)} minutes.`);
      const user = await checkCredentials(db, email, parsed.data.password);
      if (!user) throw new SignInError("That e-mail and password don't match an account.");
      limiter.reset(accountKey);
      return user;
    }),
    "form",
  );
  return authenticator;
}
