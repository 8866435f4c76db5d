import { and, eq, gt, isNull } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { Db } from "~/db/client.server";
import { organisations, passwordResets, users, type Role } from "~/db/schema";
import { hashPassword, verifyPassword } from "./password.server";
import { hashToken, newToken } from "./secret-token.server";
import { endSessionsOf } from "./session.server";
import { revokeApiTokensOf } from "./tokens.server";

export interface SessionUser {
  id: string;
  orgId: string;
  role: Role;
  displayName: string;
  email: string | null;
}

const publicColumns = {
  id: users.id,
  orgId: users.orgId,
  role: users.role,
  displayName: users.displayName,
  email: users.email,
};

export const normaliseEmail = (email: string) => email.trim().toLowerCase();

export async function getUserById(db: Db, id: string): Promise<SessionUser | undefined> {
  const [row] = await db.select(publicColumns).from(users).where(eq(users.id, id));
  return row;
}

export async function emailTaken(db: Db, email: string) {
  const [row] = await db.select({ id: users.id }).from(users).where(eq(users.email, normaliseEmail(email)));
  return Boolean(row);
}

/** Sign-up: a teacher creates their studio and becomes its admin. */
export async function createStudio(
  db: Db,
  input: { studioName: string; displayName: string; email: string; passwordHash: string },
): Promise<SessionUser> {
  const orgId = nanoid();
  const user: SessionUser = {
    id: nanoid(),
    orgId,
    role: "admin",
    displayName: input.displayName,
    email: normaliseEmail(input.email),
  };
  await db.batch([
    db.insert(organisations).values({ id: orgId, name: input.studioName }),
    db.insert(users).values({ ...user, passwordHash: input.passwordHash }),
  ]);
  return user;
}

let dummy: Promise<string> | undefined;
/** A hash of nothing anyone can type, made once, at the same cost as real ones. */
const dummyHash = () => (dummy ??= hashPassword(newToken()));

/** Returns the user when the password matches; the same `undefined` for unknown e-mail and wrong password. */
export async function checkCredentials(db: Db, email: string, password: string) {
  const [row] = await db
    .select({ ...publicColumns, passwordHash: users.passwordHash })
    .from(users)
    .where(eq(users.email, normaliseEmail(email)));
  // An unknown address (or one without a password yet) costs the same bcrypt comparison, so the
  // answer's timing doesn't tell whether the account exists.
  const matches = await verifyPassword(password, row?.passwordHash ?? (await dummyHash()));
  if (!row?.passwordHash || !matches) return undefined;
  const { passwordHash: _omit, ...user } = row;
  return user satisfies SessionUser;
}

const RESET_TTL_MS = 60 * 60 * 1000;

/** Creates a one-time reset token for an account with an e-mail; the caller mails it. */
export async function createPasswordReset(db: Db, email: string, now = Date.now()) {
  const [user] = await db
    .select({ id: users.id, displayName: users.displayName })
    .from(users)
    .where(eq(users.email, normaliseEmail(email)));
  if (!user) return undefined;
  const token = newToken();
  await db.insert(passwordResets).values({
    tokenHash: hashToken(token),
    userId: user.id,
    expiresAt: new Date(now + RESET_TTL_MS),
  });
  return { token, displayName: user.displayName };
}

async function findLiveReset(db: Db, token: string, now: number) {
  const [row] = await db
    .select()
    .from(passwordResets)
    .where(
      and(
        eq(passwordResets.tokenHash, hashToken(token)),
        isNull(passwordResets.usedAt),
        gt(passwordResets.expiresAt, new Date(now)),
      ),
    );
  return row;
}

export async function resetIsLive(db: Db, token: string, now = Date.now()) {
  return Boolean(await findLiveReset(db, token, now));
}

/**
 * Sets the new password and spends the token in one transaction; false when expired or used. Whoever
 * held the old password may still be signed in or hold a token, so every session ends, every API
 * token is revoked, and every other reset link of the user is voided with it.
 */
export async function consumePasswordReset(db: Db, token: string, password: string, now = Date.now()) {
  const reset = await findLiveReset(db, token, now);
  if (!reset) return false;
  const passwordHash = await hashPassword(password);
  return db.transaction(async (tx) => {
    const spent = await tx
      .update(passwordResets)
      .set({ usedAt: new Date(now) })
      .where(and(eq(passwordResets.tokenHash, reset.tokenHash), isNull(passwordResets.usedAt)))
      .returning({ userId: passwordResets.userId });
    // A concurrent request spent it first.
    if (spent.length === 0) return false;
    await tx.update(users).set({ passwordHash }).where(eq(users.id, reset.userId));
    await tx.update(passwordResets).set({ usedAt: new Date(now) }).where(and(eq(passwordResets.userId, reset.userId), isNull(passwordResets.usedAt)));
    await endSessionsOf(tx, reset.userId);
    await revokeApiTokensOf(tx, reset.userId);
    return true;
  });
}

/** Whether the user has a password at all (a student signed in by a sign-in card may have none). */
export async function hasPassword(db: Db, userId: string) {
  const [row] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
  return Boolean(row?.passwordHash);
}

/**
 * Changes the password of a signed-in user who proves the current one. The caller ends the user's
 * other sessions.
 */
export async function changePassword(db: Db, userId: string, current: string, password: string) {
  const [row] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
  if (!row?.passwordHash || !(await verifyPassword(current, row.passwordHash))) return false;
  await db.update(users).set({ passwordHash: await hashPassword(password) }).where(eq(users.id, userId));
  return true;
}
