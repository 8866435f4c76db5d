// Sign-in cards (docs/decisions/0008-sign-in-cards.md): a printed card signs a student without e-mail
// in on a device, by its QR code's link or by the class's join code and a personal code. Both secrets
// are stored hashed; a card is re-issued by replacing its row, which ends the devices it opened.
import { createHash, createHmac } from "node:crypto";
import { and, asc, eq, inArray } from "drizzle-orm";
import { customAlphabet, nanoid } from "nanoid";
import type { Db } from "~/db/client.server";
import { classes, memberships, signInCards, users } from "~/db/schema";
import { normaliseRoomCode, ROOM_CODE_ALPHABET } from "~/game/roomCode";
import { normaliseJoinCode } from "~/school/joinCode";
import { clientAddress, firstRefusal, peek, take, type Limits } from "./rate-limit.server";
import { hashToken, newToken } from "./secret-token.server";
import { endCardSession, endCardSessions, listCardSessions } from "./session.server";

/**
 * Eight characters of the room codes' look-alike-free alphabet: 19⁸ ≈ 17 billion codes. A guesser who
 * knows the code of a class of 40 and uses one address's whole allowance day and night (10 wrong codes
 * per 15 minutes) needs about 440 000 days per hit.
 */
export const PERSONAL_CODE_LENGTH = 8;
const newPersonalCode = customAlphabet(ROOM_CODE_ALPHABET, PERSONAL_CODE_LENGTH);

/** "HXR4M7TC" → "HXR4-M7TC": two groups are easier to copy. */
export const formatPersonalCode = (code: string) => `${code.slice(0, 4)}-${code.slice(4)}`;

// A short code's plain SHA-256 could be found by trying every code; keyed by the server's secret, a
// copy of the database alone reveals none.
const codeKey = (secret: string) => createHash("sha256").update(`fretcall sign-in card\0${secret}`).digest();
const codeHash = (secret: string, typed: string) => createHmac("sha256", codeKey(secret)).update(normaliseRoomCode(typed)).digest("hex");

export interface IssuedCard {
  userId: string;
  displayName: string;
  /** The QR code's secret, shown once: only its hash is kept. */
  token: string;
  /** The personal code as printed ("HXR4-M7TC"), shown once. */
  code: string;
}


/**
 * New cards for students of the class (ids outside its roster are skipped), in one transaction. A
 * student's old card stops working, and so does every device it signed in. Sorted by name, as printed.
 */
export async function issueCards(db: Db, secret: string, classId: string, studentIds: readonly string[], issuedBy: string) {
  if (!studentIds.length) return [];
  return db.transaction(async (tx) => {
    const students = await tx
      .select({ id: users.id, displayName: users.displayName })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.classId, classId), eq(memberships.role, "student"), inArray(memberships.userId, [...studentIds])))
      .orderBy(asc(users.displayName));
    if (!students.length) return [];
    const old = await tx.select({ id: signInCards.id }).from(signInCards).where(inArray(signInCards.userId, students.map((s) => s.id)));
    const oldIds = old.map((c) => c.id);
    await endCardSessions(tx, oldIds);
    if (oldIds.length) await tx.delete(signInCards).where(inArray(signInCards.id, oldIds));
    const issued: IssuedCard[] = [];
    for (const student of students) {
      const token = newToken();
      let code = newPersonalCode();
      // Codes are unique across all cards, so a typed code names one card; a clash is rare, so just draw again.
      while ((await tx.select({ id: signInCards.id }).from(signInCards).where(eq(signInCards.codeHash, codeHash(secret, code)))).length) {
        code = newPersonalCode();
      }
      await tx.insert(signInCards).values({ id: nanoid(), userId: student.id, tokenHash: hashToken(token), codeHash: codeHash(secret, code), issuedBy });
      issued.push({ userId: student.id, displayName: student.displayName, token, code: formatPersonalCode(code) });
    }
    return issued;
  });
}

export interface CardHolder {
  cardId: string;
  userId: string;
  displayName: string;
}

/** The student a card's link signs in, or undefined for a link that opens nothing (never issued, re-issued, deleted). */
export async function cardByToken(db: Db, token: string): Promise<CardHolder | undefined> {
  const [row] = await db
    .select({ cardId: signInCards.id, userId: users.id, displayName: users.displayName })
    .from(signInCards)
    .innerJoin(users, eq(users.id, signInCards.userId))
    .where(and(eq(signInCards.tokenHash, hashToken(token)), eq(users.role, "student")));
  return row;
}

/** The student whose live card has this personal code, when they are a student of the class with this join code. */
async function cardByCodes(db: Db, secret: string, classCode: string, personalCode: string): Promise<CardHolder | undefined> {
  const [row] = await db
    .select({ cardId: signInCards.id, userId: users.id, displayName: users.displayName })
    .from(signInCards)
    .innerJoin(users, eq(users.id, signInCards.userId))
    .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.role, "student")))
    .innerJoin(classes, eq(classes.id, memberships.classId))
    .where(and(eq(signInCards.codeHash, codeHash(secret, personalCode)), eq(classes.joinCode, classCode), eq(users.role, "student")));
  return row;
}

export type CardSignIn = { ok: true; holder: CardHolder } | { ok: false; message: string; retryAfter?: number };

const WRONG_CODES = "Those codes don't match a sign-in card. Check both codes on your card, or ask your teacher for a new card.";
/** How long a sign-in with a class code under attack from elsewhere waits: slowed, never refused. */
const CLASS_SLOWDOWN_MS = 1000;

/**
 * Typed codes, limited like passwords (docs/decisions/0006-…): only failures count — per class code and
 * address, per address, and per class code from anywhere (which slows, never refuses) — and a wrong
 * class code reads exactly like a wrong personal code, so no class or card is revealed.
 */
export async function signInWithCodes(
  db: Db,
  secret: string,
  limits: Limits["cards"],
  request: Request,
  typed: { classCode: string; personalCode: string },
): Promise<CardSignIn> {
  const classCode = normaliseJoinCode(typed.classCode);
  const personalCode = normaliseRoomCode(typed.personalCode);
  if (!classCode) return { ok: false, message: "Enter your class's code from your card." };
  if (!personalCode) return { ok: false, message: "Enter your personal code from your card." };
  if (classCode.length > 12 || personalCode.length > 12) return { ok: false, message: WRONG_CODES };
  const address = clientAddress(request);
  const pair = `${classCode} ${address}`;
  const refused = await firstRefusal([peek(limits.pair, pair), peek(limits.address, address)]);
  if (refused) return { ok: false, ...refused };
  if (await peek(limits.class, classCode)) await new Promise((done) => setTimeout(done, CLASS_SLOWDOWN_MS));
  const holder = await cardByCodes(db, secret, classCode, personalCode);
  if (!holder) {
    await Promise.all([take(limits.pair, pair), take(limits.address, address), take(limits.class, classCode)]);
    return { ok: false, message: WRONG_CODES };
  }
  await limits.pair.limiter.delete(pair);
  return { ok: true, holder };
}

/**
 * A card's link: a link that opens nothing counts against the address's card limit (the token is
 * unguessable, so only a scripted guesser fails often), and past it every link from there is refused.
 */
export async function signInWithToken(db: Db, limits: Limits["cards"], request: Request, token: string): Promise<CardSignIn> {
  const address = clientAddress(request);
  const refused = await peek(limits.address, address);
  if (refused) return { ok: false, ...refused };
  const holder = token.length <= 100 ? await cardByToken(db, token) : undefined;
  if (holder) return { ok: true, holder };
  await take(limits.address, address);
  return { ok: false, message: "This sign-in card no longer works: it was replaced by a new one, or the student was removed. Ask your teacher for a new card." };
}

export interface CardDevice {
  id: string;
  device: string;
  createdAt: Date;
  lastSeenAt: Date;
}

export interface StudentCard {
  userId: string;
  displayName: string;
  hasEmail: boolean;
  /** When the live card was issued; null when the student has none. */
  issuedAt: Date | null;
  /** Devices the live card signed in, most recently used first. */
  devices: CardDevice[];
}

/** The class's students, each with their card and the devices it signed in. */
export async function cardsOfClass(db: Db, classId: string, now = Date.now()): Promise<StudentCard[]> {
  const students = await db
    .select({ userId: users.id, displayName: users.displayName, email: users.email, cardId: signInCards.id, issuedAt: signInCards.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .leftJoin(signInCards, eq(signInCards.userId, users.id))
    .where(and(eq(memberships.classId, classId), eq(memberships.role, "student")))
    .orderBy(asc(users.displayName));
  const live = await listCardSessions(db, students.flatMap((s) => (s.cardId ? [s.cardId] : [])), now);
  return students.map((s) => ({
    userId: s.userId,
    displayName: s.displayName,
    hasEmail: s.email !== null,
    issuedAt: s.issuedAt,
    devices: live.filter((d) => d.cardId === s.cardId).map(({ id, device, createdAt, lastSeenAt }) => ({ id, device, createdAt, lastSeenAt })),
  }));
}

/** Ends a device a card signed in, when its student is in the class; false when there is no such device. */
export async function endCardDevice(db: Db, classId: string, sessionId: string) {
  const students = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.classId, classId), eq(memberships.role, "student")));
  return endCardSession(db, sessionId, students.map((s) => s.userId));
}
