// Sessions live on the server (docs/decisions/0004-server-side-sessions.md): the cookie carries a
// random id, the `sessions` table a SHA-256 of it, so a session can be ended from anywhere and a
// copy of the database opens none.
import { and, desc, eq, inArray, isNotNull, lte, ne, or, type SQL } from "drizzle-orm";
import { nanoid } from "nanoid";
import { createSessionStorage as createRouterSessionStorage, redirect } from "react-router";
import type { Db, Writer } from "~/db/client.server";
import { userSessions, type Role } from "~/db/schema";
import { deviceLabel } from "./device";
import { hashToken, newToken } from "./secret-token.server";

export interface SessionData {
  userId: string;
  /** Set only while a session is being created; the table keeps it. */
  device?: string;
  /** The sign-in card that opened the session (a device session), set as `device` is. */
  cardId?: string;
}
export interface SessionFlash {
  notice: string;
}

export const SESSION_COOKIE = "fretcall_session";

const DAY_MS = 24 * 60 * 60 * 1000;
// Reads stay cheap: last-seen (and so the idle limit) moves at most once a minute.
export const TOUCH_EVERY_MS = 60 * 1000;

export interface SessionOptions {
  secret: string;
  /** Secure cookie: true when the public address is https. */
  secure: boolean;
  maxDays: number;
  idleDays: number;
  /** A sign-in card's device session: a phone at home should not ask a child to sign in every week. */
  cardMaxDays: number;
  cardIdleDays: number;
}

/** Whether a stored session is still good at `now`, and whether its last-seen should move. */
export function sessionState(row: { lastSeenAt: Date; expiresAt: Date; idleExpiresAt: Date }, now: number) {
  if (now >= row.expiresAt.getTime() || now >= row.idleExpiresAt.getTime()) return "expired";
  return now - row.lastSeenAt.getTime() >= TOUCH_EVERY_MS ? "touch" : "live";
}

export function createSessionStorage(db: Db, options: SessionOptions) {
  const idleMs = (cardId: string | null | undefined) => (cardId ? options.cardIdleDays : options.idleDays) * DAY_MS;
  const flashOf = ({ userId: _u, device: _d, cardId: _c, ...flash }: Record<string, unknown>) =>
    Object.keys(flash).length ? flash : null;
  return createRouterSessionStorage<SessionData, SessionFlash>({
    cookie: {
      name: SESSION_COOKIE,
      httpOnly: true,
      sameSite: "lax",
      secure: options.secure,
      path: "/",
      // Signed as well, so a made-up cookie is turned away before it costs a database read.
      secrets: [options.secret],
      maxAge: Math.round((options.maxDays * DAY_MS) / 1000),
    },
    async createData(data) {
      const { userId, device, cardId } = data as Partial<SessionData>;
      if (!userId) throw new Error("A session is stored only for a signed-in user.");
      const at = Date.now();
      // Expired rows go whenever a new one comes, so the table holds only live sessions.
      await db.delete(userSessions).where(or(lte(userSessions.expiresAt, new Date(at)), lte(userSessions.idleExpiresAt, new Date(at))));
      const id = newToken();
      await db.insert(userSessions).values({
        id: nanoid(),
        tokenHash: hashToken(id),
        userId,
        device: device ?? deviceLabel(null),
        cardId: cardId ?? null,
        flash: flashOf(data),
        createdAt: new Date(at),
        lastSeenAt: new Date(at),
        expiresAt: new Date(at + (cardId ? options.cardMaxDays : options.maxDays) * DAY_MS),
        idleExpiresAt: new Date(at + idleMs(cardId)),
      });
      return id;
    },
    async readData(id) {
      const tokenHash = hashToken(id);
      const [row] = await db.select().from(userSessions).where(eq(userSessions.tokenHash, tokenHash));
      if (!row) return null;
      const at = Date.now();
      const state = sessionState(row, at);
      if (state === "expired") {
        await db.delete(userSessions).where(eq(userSessions.tokenHash, tokenHash));
        return null;
      }
      if (state === "touch") {
        await db
          .update(userSessions)
          .set({ lastSeenAt: new Date(at), idleExpiresAt: new Date(at + idleMs(row.cardId)) })
          .where(eq(userSessions.tokenHash, tokenHash));
      }
      return { ...row.flash, userId: row.userId };
    },
    async updateData(id, data) {
      // Only flash values change on a stored session; a new sign-in always makes a new one.
      await db.update(userSessions).set({ flash: flashOf(data) }).where(eq(userSessions.tokenHash, hashToken(id)));
    },
    async deleteData(id) {
      if (id) await db.delete(userSessions).where(eq(userSessions.tokenHash, hashToken(id)));
    },
  });
}
export type SessionStorage = ReturnType<typeof createSessionStorage>;

/** Each role's landing page after sign-in. */
export function homeFor(role: Role): string {
  return role === "student" ? "/me" : role === "admin" ? "/admin" : "/teach";
}

/**
 * Signs a user in with a fresh session (never one the visitor already held, so a planted cookie
 * can't be carried into an account); a session the browser had before is ended. With `card`, a
 * sign-in card's device session, whose cookie lives as long as the card session may.
 */
export async function startSession(
  storage: SessionStorage,
  request: Request,
  userId: string,
  to: string,
  card?: { id: string; maxDays: number },
) {
  const previous = await storage.getSession(request.headers.get("Cookie"));
  if (previous.id) await storage.destroySession(previous);
  const session = await storage.getSession();
  session.set("userId", userId);
  session.set("device", deviceLabel(request.headers.get("User-Agent")));
  if (card) session.set("cardId", card.id);
  // Behind a trusted proxy the request's own scheme counts too (Express sets it from X-Forwarded-Proto).
  const overHttps = new URL(request.url).protocol === "https:";
  const cookie = { ...(overHttps ? { secure: true } : {}), ...(card ? { maxAge: Math.round((card.maxDays * DAY_MS) / 1000) } : {}) };
  return redirect(to, { headers: { "Set-Cookie": await storage.commitSession(session, cookie) } });
}

/** Ends the request's session on the server and clears the cookie. */
export async function endSession(storage: SessionStorage, request: Request, to: string) {
  const session = await storage.getSession(request.headers.get("Cookie"));
  return redirect(to, { headers: { "Set-Cookie": await storage.destroySession(session) } });
}

/** The stored row's handle of the request's session, or undefined when it has none. */
export async function currentSessionId(db: Db, storage: SessionStorage, request: Request) {
  const session = await storage.getSession(request.headers.get("Cookie"));
  if (!session.get("userId")) return undefined;
  const [row] = await db.select({ id: userSessions.id }).from(userSessions).where(eq(userSessions.tokenHash, hashToken(session.id)));
  return row?.id;
}

/** The live sessions that match, most recently active first. */
async function liveSessions(db: Db, where: SQL, now: number) {
  const rows = await db
    .select({
      id: userSessions.id,
      cardId: userSessions.cardId,
      device: userSessions.device,
      createdAt: userSessions.createdAt,
      lastSeenAt: userSessions.lastSeenAt,
      expiresAt: userSessions.expiresAt,
      idleExpiresAt: userSessions.idleExpiresAt,
    })
    .from(userSessions)
    .where(where)
    .orderBy(desc(userSessions.lastSeenAt));
  return rows.filter((r) => sessionState(r, now) !== "expired");
}

/** A user's live sessions, most recently active first. */
export const listSessions = (db: Db, userId: string, now = Date.now()) => liveSessions(db, eq(userSessions.userId, userId), now);

/** Ends one of the user's sessions by its handle; false when there is no such session of theirs. */
export async function endSessionById(db: Writer, userId: string, id: string) {
  const ended = await db
    .delete(userSessions)
    .where(and(eq(userSessions.userId, userId), eq(userSessions.id, id)))
    .returning({ id: userSessions.id });
  return ended.length > 0;
}

/** Ends every session of the user, or every one but `keep` (the session that asked). */
export async function endSessionsOf(db: Writer, userId: string, keep?: string) {
  const ended = await db
    .delete(userSessions)
    .where(and(eq(userSessions.userId, userId), keep ? ne(userSessions.id, keep) : undefined))
    .returning({ id: userSessions.id });
  return ended.length;
}

// ---- sessions a sign-in card opened (docs/decisions/0008-sign-in-cards.md) ----

/** The live sessions the cards opened, most recently active first. */
export async function listCardSessions(db: Db, cardIds: string[], now = Date.now()) {
  return cardIds.length ? liveSessions(db, inArray(userSessions.cardId, cardIds), now) : [];
}

/** Ends every session the cards opened (by name: a pooled connection may lack foreign keys). */
export async function endCardSessions(db: Writer, cardIds: string[]) {
  if (cardIds.length) await db.delete(userSessions).where(inArray(userSessions.cardId, cardIds));
}

/** Ends one session that a card opened for one of `userIds`; false when there is no such session. */
export async function endCardSession(db: Writer, id: string, userIds: string[]) {
  if (!userIds.length) return false;
  const ended = await db
    .delete(userSessions)
    .where(and(eq(userSessions.id, id), isNotNull(userSessions.cardId), inArray(userSessions.userId, userIds)))
    .returning({ id: userSessions.id });
  return ended.length > 0;
}
