import { and, eq, isNull } from "drizzle-orm";
import { nanoid } from "nanoid";
import type { Db, Writer } from "~/db/client.server";
import { apiTokens } from "~/db/schema";
import { hashToken as hash, newToken } from "./secret-token.server";

// The prefix makes a leaked token easy to recognise in logs and secret scanners.
const PREFIX = "fcl_";

/** Creates a token; the plain value is returned once and never stored. */
export async function createApiToken(db: Db, userId: string, name: string) {
  const token = `${PREFIX}${newToken(24)}`;
  const id = nanoid();
  await db.insert(apiTokens).values({ id, userId, name, tokenHash: hash(token) });
  return { id, token };
}

export async function listApiTokens(db: Db, userId: string) {
  return db
    .select({ id: apiTokens.id, name: apiTokens.name, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(apiTokens.createdAt);
}

export async function revokeApiToken(db: Db, userId: string, id: string) {
  const done = await db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, id), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
    .returning({ id: apiTokens.id });
  return done.length > 0;
}

/** Revokes every live token of the user (after a password reset). */
export async function revokeApiTokensOf(db: Writer, userId: string) {
  await db.update(apiTokens).set({ revokedAt: new Date() }).where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)));
}

/** The user id a live bearer token belongs to, or undefined. */
export async function userIdForToken(db: Db, token: string): Promise<string | undefined> {
  if (!token.startsWith(PREFIX)) return undefined;
  const [row] = await db
    .update(apiTokens)
    .set({ lastUsedAt: new Date() })
    .where(and(eq(apiTokens.tokenHash, hash(token)), isNull(apiTokens.revokedAt)))
    .returning({ userId: apiTokens.userId });
  return row?.userId;
}
