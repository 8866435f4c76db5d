import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import type { Db } from "~/db/client.server";
import { checkLimits, type AttemptLimits } from "./rate-limit.server";
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
export type SignInResult = { ok: true; user: SessionUser } | { ok: false; message: string };

export function createAuthenticator(db: Db, limits: AttemptLimits) {
  const authenticator = new Authenticator<SignInResult>();
  authenticator.use(
    new FormStrategy(async ({ form, request }): Promise<SignInResult> => {
      const parsed = signInSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) return { ok: false, message: parsed.error.issues[0]!.message };
      const address = normaliseEmail(parsed.data.email);
      const wait = checkLimits(limits, address, request);
      if (wait > 0) return { ok: false, message: `Too many sign-in attempts. Try again in ${Math.ceil(wait / 60)} minutes.` };
      const user = await checkCredentials(db, address, parsed.data.password);
      if (!user) return { ok: false, message: "That e-mail and password don't match an account." };
      limits.account.reset(address);
      return { ok: true, user };
    }),
    "form",
  );
  return authenticator;
}
