// Starting a studio is confirmed by e-mail, so the sign-up form answers the same whether or not
// its address already has an account (anywhere): "check your e-mail". A new address gets a link
// that creates the studio; an address in use gets a note telling its owner how to sign in instead.
// The pending studio travels sealed inside the link (AES-256-GCM under a key derived from the
// session secret): nothing is stored until the link is used, and once used the address is taken,
// so the link works once.
import { createCipheriv, createDecipheriv, createHash, randomBytes } from "node:crypto";
import { z } from "zod";
import type { Db } from "~/db/client.server";
import type { MailQueue } from "~/mail/queue.server";
import { hashPassword } from "./password.server";
import { createStudio, emailTaken, normaliseEmail } from "./users.server";

export const SIGNUP_TTL_MS = 24 * 60 * 60 * 1000;

const pending = z.object({ studioName: z.string(), displayName: z.string(), email: z.string(), passwordHash: z.string(), expiresAt: z.number() });
type PendingStudio = z.infer<typeof pending>;

const keyOf = (secret: string) => createHash("sha256").update(`fretcall sign-up link\0${secret}`).digest();

export function sealSignUp(secret: string, studio: PendingStudio) {
  const iv = randomBytes(12);
  const cipher = createCipheriv("aes-256-gcm", keyOf(secret), iv);
  const sealed = Buffer.concat([cipher.update(JSON.stringify(studio), "utf8"), cipher.final()]);
  return Buffer.concat([iv, cipher.getAuthTag(), sealed]).toString("base64url");
}

/** The pending studio of a live link; undefined for a damaged, forged or expired one. */
export function openSignUp(secret: string, token: string, now = Date.now()): PendingStudio | undefined {
  try {
    const raw = Buffer.from(token, "base64url");
    const decipher = createDecipheriv("aes-256-gcm", keyOf(secret), raw.subarray(0, 12));
    decipher.setAuthTag(raw.subarray(12, 28));
    const text = Buffer.concat([decipher.update(raw.subarray(28)), decipher.final()]).toString("utf8");
    const studio = pending.parse(JSON.parse(text));
    return studio.expiresAt > now ? studio : undefined;
  } catch {
    return undefined;
  }
}

/**
 * Takes a sign-up and queues the one e-mail it leads to. Both paths hash the password (the same
 * work, so the same time) and queue one message after the answer.
 */
export async function requestStudio(
  db: Db,
  mail: MailQueue,
  opts: { secret: string; publicUrl: string },
  input: { studioName: string; displayName: string; email: string; password: string },
  now = Date.now(),
) {
  const email = normaliseEmail(input.email);
  const passwordHash = await hashPassword(input.password);
  if (await emailTaken(db, email)) {
    mail.send({
      orgId: null,
      to: email,
      subject: "Your Fretcall account",
      text: `Hello,\n\nSomeone asked to start a new studio on Fretcall with this e-mail address, which already has an account. One address can hold one account, so no studio was created.\n\nIf it was you, sign in at ${opts.publicUrl}/signin (or choose a new password at ${opts.publicUrl}/forgot). If it wasn't, you can ignore this e-mail.\n`,
    });
    return;
  }
  const token = sealSignUp(opts.secret, { studioName: input.studioName, displayName: input.displayName, email, passwordHash, expiresAt: now + SIGNUP_TTL_MS });
  mail.send({
    orgId: null,
    to: email,
    subject: "Finish starting your studio on Fretcall",
    text: `Hello ${input.displayName},\n\nTo create "${input.studioName}" on Fretcall and sign in as its admin, open this link within 24 hours:\n\n${opts.publicUrl}/signup?studio=${token}\n\nIf you didn't ask for this, ignore this e-mail; nothing is created.\n`,
  });
}

export type ConfirmResult = { ok: true; userId: string } | { ok: false; error: string };

/** Creates the studio of a live link. */
export async function confirmStudio(db: Db, secret: string, token: string, now = Date.now()): Promise<ConfirmResult> {
  const studio = openSignUp(secret, token, now);
  if (!studio) return { ok: false, error: "This link isn't valid or has expired (links last 24 hours). Start again below." };
  if (await emailTaken(db, studio.email)) return { ok: false, error: "This studio was already created. Sign in with the password you chose." };
  try {
    return { ok: true, userId: (await createStudio(db, studio)).id };
  } catch (error) {
    // The same link used twice at once: the other use created it.
    if (await emailTaken(db, studio.email)) return { ok: false, error: "This studio was already created. Sign in with the password you chose." };
    throw error;
  }
}
