// Classes, rosters and people: who is in a class, and the admin's changes to the school (who may see what: app/auth/access.server.ts).
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { nanoid } from "nanoid";
import { TEACHING_ROLES, type ClassRecord } from "~/auth/access.server";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import { listSessions } from "~/auth/session.server";
import { listApiTokens } from "~/auth/tokens.server";
import {
  answers,
  apiTokens,
  assignments,
  assignmentTargets,
  classes,
  invitations,
  mailLog,
  memberships,
  passwordResets,
  practiceAnswers,
  rhythmAttempts,
  roomEvents,
  roomPlayers,
  rooms,
  signInCards,
  users,
  userSessions,
} from "~/db/schema";
import { looksLikeRoomCode, newJoinCode, normaliseJoinCode } from "./joinCode";
import { checkRosterRows, type CheckedRow, type RosterRow } from "./roster";
import { createInvitation, revokeInvitations } from "./invitations.server";

/** "card": no password, but a live sign-in card (docs/decisions/0008-sign-in-cards.md). */
export type SignInStatus = "nickname" | "card" | "active" | "invited" | "invite-expired";

export interface RosterEntry {
  id: string;
  displayName: string;
  email: string | null;
  joinedAt: string;
  status: SignInStatus;
  inviteExpiresAt: string | null;
}

export async function rosterOf(db: Db, classId: string, now = Date.now()): Promise<RosterEntry[]> {
  const rows = await db
    .select({
      id: users.id,
      displayName: users.displayName,
      email: users.email,
      hasPassword: sql<number>`${users.passwordHash} is not null`,
      hasCard: sql<number>`exists (select 1 from ${signInCards} where ${signInCards.userId} = ${users.id})`,
      joinedAt: memberships.createdAt,
      inviteExpiresAt: sql<number | null>`(select max(${invitations.expiresAt}) from ${invitations}
        where ${invitations.userId} = ${users.id} and ${invitations.classId} = ${classId}
        and ${invitations.acceptedAt} is null and ${invitations.revokedAt} is null)`,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.classId, classId), eq(memberships.role, "student")))
    .orderBy(users.displayName);
  return rows.map((r) => ({
    id: r.id,
    displayName: r.displayName,
    email: r.email,
    joinedAt: r.joinedAt.toISOString(),
    status: r.hasPassword ? "active" : r.hasCard ? "card" : !r.email ? "nickname" : r.inviteExpiresAt && r.inviteExpiresAt > now ? "invited" : "invite-expired",
    inviteExpiresAt: r.inviteExpiresAt ? new Date(r.inviteExpiresAt).toISOString() : null,
  }));
}

/**
 * What the import needs to know about the e-mails in a batch: which belong to the school's students,
 * which to other people of the school, and which to accounts elsewhere. An address in use at
 * another school is treated like a new one in every answer (adding someone must not tell whether
 * an address has an account anywhere); see addStudents.
 */
async function emailOwners(db: Db, orgId: string, emails: string[]) {
  const found = emails.length
    ? await db
        .select({ id: users.id, email: users.email, orgId: users.orgId, role: users.role, hasPassword: sql<number>`${users.passwordHash} is not null` })
        .from(users)
        .where(inArray(users.email, emails))
    : [];
  const reusable = new Map<string, { id: string; hasPassword: boolean }>();
  const blocked = new Map<string, string>();
  const elsewhere = new Set<string>();
  for (const u of found) {
    if (u.orgId !== orgId) elsewhere.add(u.email!);
    else if (u.role === "student") reusable.set(u.email!, { id: u.id, hasPassword: Boolean(u.hasPassword) });
    else blocked.set(u.email!, "This e-mail belongs to a teacher or admin of your school, who can't join as a student.");
  }
  return { reusable, blocked, elsewhere };
}

export async function checkRowsForClass(db: Db, cls: ClassRecord, rows: readonly RosterRow[]) {
  const roster = await rosterOf(db, cls.id);
  const emails = [...new Set(rows.map((r) => r.email.trim().toLowerCase()).filter(Boolean))];
  const owners = await emailOwners(db, cls.orgId, emails);
  const checked = checkRosterRows(rows, {
    names: roster.map((r) => r.displayName),
    emails: roster.flatMap((r) => (r.email ? [r.email] : [])),
    blockedEmails: owners.blocked,
  });
  return { checked, reusable: owners.reusable, elsewhere: owners.elsewhere };
}

/** An address that already has an account at another school: its owner is told instead of invited. */
export interface AddressInUse {
  email: string;
  displayName: string;
}

export interface InviteToSend {
  email: string;
  displayName: string;
  token: string;
}

/**
 * Adds checked rows to a class in one transaction: new students are created (nickname-only when
 * there is no e-mail); a student of the school who already has that e-mail is enrolled as they are.
 * An address in use at another school gives a nickname-only student here and a note to its owner,
 * with the same answer as a new address. Returns the invitations and notes to mail, or the rows'
 * errors when any row fails (nothing is stored then).
 */
export async function addStudents(
  db: Db,
  cls: ClassRecord,
  invitedBy: string,
  rows: readonly RosterRow[],
): Promise<{ ok: true; invites: InviteToSend[]; inUse: AddressInUse[]; added: number } | { ok: false; rows: CheckedRow[] }> {
  const { checked, reusable, elsewhere } = await checkRowsForClass(db, cls, rows);
  if (rows.length === 0 || checked.some((r) => r.errors.length)) return { ok: false, rows: checked };
  const inUse: AddressInUse[] = [];
  const invites = await db.transaction(async (tx) => {
    const out: InviteToSend[] = [];
    for (const row of checked) {
      const existing = row.email ? reusable.get(row.email) : undefined;
      const userId = existing?.id ?? nanoid();
      const taken = Boolean(row.email && elsewhere.has(row.email));
      if (taken) inUse.push({ email: row.email, displayName: row.name });
      if (!existing) {
        await tx.insert(users).values({
          id: userId,
          orgId: cls.orgId,
          role: "student",
          displayName: row.name,
          email: (!taken && row.email) || null,
        });
      }
      await tx.insert(memberships).values({ classId: cls.id, userId, role: "student" });
      if (row.email && !taken && !existing?.hasPassword) {
        const token = await createInvitation(tx, { userId, classId: cls.id, invitedBy });
        out.push({ email: row.email, displayName: row.name, token });
      }
    }
    return out;
  });
  return { ok: true, invites, inUse, added: checked.length };
}

/** Takes a student off a class roster; their account and other classes stay. */
export async function removeFromClass(db: Db, classId: string, userId: string) {
  const gone = await db
    .delete(memberships)
    .where(and(eq(memberships.classId, classId), eq(memberships.userId, userId), eq(memberships.role, "student")))
    .returning({ userId: memberships.userId });
  if (gone.length) await revokeInvitations(db, userId, classId);
  return gone.length > 0;
}

/** A new link for a roster student who has an e-mail and hasn't set a password yet. */
export async function resendStudentInvite(db: Db, classId: string, userId: string, invitedBy: string) {
  const [student] = await db
    .select({ email: users.email, displayName: users.displayName, passwordHash: users.passwordHash })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.classId, classId), eq(memberships.userId, userId), eq(memberships.role, "student")));
  if (!student?.email || student.passwordHash) return undefined;
  const token = await createInvitation(db, { userId, classId, invitedBy });
  return { email: student.email, displayName: student.displayName, token };
}

export type JoinResult = { ok: true; className: string } | { ok: false; error: string };

/** A signed-in student joins a class of their own school by its join code. */
export async function joinByCode(db: Db, user: SessionUser, typed: string): Promise<JoinResult> {
  const code = normaliseJoinCode(typed);
  if (!code) return { ok: false, error: "Enter the class join code your teacher gave you." };
  const [cls] = await db
    .select({ id: classes.id, name: classes.name })
    .from(classes)
    .where(and(eq(classes.joinCode, code), eq(classes.orgId, user.orgId)));
  if (!cls && looksLikeRoomCode(typed)) return { ok: false, error: `${code} looks like the room code of a live round: open Join a round for that. A class join code looks like KMNP-3479.` };
  if (!cls) return { ok: false, error: `No class has the join code ${code}. Check it with your teacher.` };
  const added = await db
    .insert(memberships)
    .values({ classId: cls.id, userId: user.id, role: "student" })
    .onConflictDoNothing()
    .returning({ classId: memberships.classId });
  return added.length ? { ok: true, className: cls.name } : { ok: false, error: `You're already in ${cls.name}.` };
}

// ---- the admin's side ----------------------------------------------------------------------------

/** A fresh join code, checked against every class (codes are unique across schools). */
async function freshJoinCode(db: Db) {
  for (;;) {
    const code = newJoinCode();
    const [taken] = await db.select({ id: classes.id }).from(classes).where(eq(classes.joinCode, code));
    if (!taken) return code;
  }
}

export async function createClass(db: Db, orgId: string, name: string, teacherId?: string) {
  const id = nanoid();
  const joinCode = await freshJoinCode(db);
  await db.batch([
    db.insert(classes).values({ id, orgId, name, joinCode }),
    ...(teacherId ? [db.insert(memberships).values({ classId: id, userId: teacherId, role: "teacher" as const })] : []),
  ]);
  return { id, joinCode };
}

export async function classInSchool(db: Db, orgId: string, classId: string) {
  const [row] = await db
    .select({ id: classes.id, name: classes.name })
    .from(classes)
    .where(and(eq(classes.id, classId), eq(classes.orgId, orgId)));
  return row;
}

export async function teacherInSchool(db: Db, orgId: string, userId: string) {
  const [row] = await db
    .select({ id: users.id, displayName: users.displayName, email: users.email, passwordHash: users.passwordHash })
    .from(users)
    .where(and(eq(users.id, userId), eq(users.orgId, orgId), inArray(users.role, [...TEACHING_ROLES])));
  return row;
}

export async function renameClass(db: Db, classId: string, name: string) {
  await db.update(classes).set({ name }).where(eq(classes.id, classId));
}

/** Adds (or, with `teach: false`, removes) a teacher of a class. */
export async function setTeacher(db: Db, classId: string, userId: string, teach: boolean) {
  if (teach) {
    await db.insert(memberships).values({ classId, userId, role: "teacher" }).onConflictDoNothing();
  } else {
    await db
      .delete(memberships)
      .where(and(eq(memberships.classId, classId), eq(memberships.userId, userId), eq(memberships.role, "teacher")));
  }
}

/** Whether an address belongs to someone of this school (other schools' accounts are not told). */
export async function emailInSchool(db: Db, orgId: string, email: string) {
  const [row] = await db.select({ id: users.id }).from(users).where(and(eq(users.email, email), eq(users.orgId, orgId)));
  return Boolean(row);
}

/**
 * A new teacher account, without a password until they accept the invitation to their first class.
 * When the address already has an account at another school, the teacher is added without it and
 * no invitation is made (`token` undefined): the caller mails the address's owner a note instead,
 * and answers as for a new address.
 */
export async function addTeacher(db: Db, orgId: string, input: { displayName: string; email: string; classId: string }, invitedBy: string) {
  const id = nanoid();
  const [elsewhere] = await db.select({ id: users.id }).from(users).where(eq(users.email, input.email));
  return db.transaction(async (tx) => {
    await tx.insert(users).values({ id, orgId, role: "teacher", displayName: input.displayName, email: elsewhere ? null : input.email });
    await tx.insert(memberships).values({ classId: input.classId, userId: id, role: "teacher" });
    return { id, token: elsewhere ? undefined : await createInvitation(tx, { userId: id, classId: input.classId, invitedBy }) };
  });
}

/** The class a pending teacher's newest invitation is for, so a resend goes to the same place. */
export async function lastInvitedClass(db: Db, userId: string) {
  const [row] = await db
    .select({ classId: invitations.classId, className: classes.name })
    .from(invitations)
    .innerJoin(classes, eq(classes.id, invitations.classId))
    .where(and(eq(invitations.userId, userId), isNull(invitations.acceptedAt)))
    .orderBy(sql`${invitations.createdAt} desc`)
    .limit(1);
  return row;
}

export async function studentInSchool(db: Db, orgId: string, userId: string) {
  const [row] = await db
    .select({ id: users.id, displayName: users.displayName, email: users.email, createdAt: users.createdAt })
    .from(users)
    .where(and(eq(users.id, userId), eq(users.orgId, orgId), eq(users.role, "student")));
  return row;
}

/** What a deleted student's seats in past rounds are called from then on (a valid nickname, so a replay accepts it). */
export const REMOVED_STUDENT = "Removed student";

/**
 * Deletes a student and everything that names or identifies them, in one transaction:
 * - the account, class places, invitations, reset links, API tokens, practice answers, rhythm
 *   attempts, assignment targets and mail log rows (the foreign keys would cascade too, but a
 *   pooled connection may lack `foreign_keys = ON`, so each is deleted by name);
 * - their seats in past rounds stay for the class's figures, with the answers, but unlinked and
 *   renamed REMOVED_STUDENT, and so does the nickname in each seat's join record in the round's
 *   event log, which the results page and a restarted hub replay.
 * Deleted pages are overwritten (secure_delete) and the WAL is copied back and emptied after the
 * commit, so the name is gone from the database file and its WAL, not just unreachable.
 *
 * A student seated in a live round right now: the database is cleaned at once, and the room on the
 * stage plays on from memory under the name it showed until it ends (its seat row is never written
 * again); its results, and the room if the server restarts, show REMOVED_STUDENT.
 */
export async function deleteStudent(db: Db, orgId: string, userId: string) {
  const gone = await db.transaction(async (tx) => {
    // Again here: the pool may lend this transaction a connection that openDb did not set up.
    if (db.$client.protocol === "file") await tx.run(sql`PRAGMA secure_delete = ON`);
    const [student] = await tx
      .select({ id: users.id })
      .from(users)
      .where(and(eq(users.id, userId), eq(users.orgId, orgId), eq(users.role, "student")));
    if (!student) return false;
    const seats = (await tx.select({ id: roomPlayers.id }).from(roomPlayers).where(eq(roomPlayers.userId, userId))).map((s) => s.id);
    if (seats.length) {
      await tx
        .update(roomEvents)
        .set({ event: sql`json_set(${roomEvents.event}, '$.event.nickname', ${REMOVED_STUDENT})` })
        .where(and(sql`json_extract(${roomEvents.event}, '$.event.type') = 'join'`, inArray(sql`json_extract(${roomEvents.event}, '$.event.playerId')`, seats)));
      await tx.update(roomPlayers).set({ userId: null, nickname: REMOVED_STUDENT }).where(inArray(roomPlayers.id, seats));
    }
    // A table that keeps a user id belongs in this list too.
    for (const table of [userSessions, signInCards, memberships, invitations, passwordResets, apiTokens, assignmentTargets, practiceAnswers, rhythmAttempts, mailLog]) {
      await tx.delete(table).where(eq(table.userId, userId));
    }
    await tx.delete(users).where(eq(users.id, userId));
    return true;
  });
  // A remote database has no WAL of ours to empty.
  if (gone && db.$client.protocol === "file") await emptyWal(db);
  return gone;
}

/**
 * Copies the WAL into the database file and truncates it. A reader or the checkpointer thread may
 * hold it up for a moment, so it is tried a few times; should it still not finish, the next
 * checkpoint does the same (with secure_delete, the copied pages hold no trace of the row).
 */
async function emptyWal(db: Db) {
  for (let attempt = 0; attempt < 20; attempt++) {
    // The first column is 1 when the checkpoint could not finish; a busy error is tried again too,
    // as the deletion itself is committed by now.
    const done = await db.$client.execute("PRAGMA wal_checkpoint(TRUNCATE)").then(
      (result) => Number(result.rows[0]?.[0] ?? 0) === 0,
      () => false,
    );
    if (done) return;
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * Everything Fretcall keeps about one person, for them or their school's admin to download. Never
 * a secret: tokens and invitations are listed by name and dates, not by hash.
 */
export async function exportPersonalData(db: Db, userId: string) {
  const [profile] = await db
    .select({ id: users.id, displayName: users.displayName, email: users.email, role: users.role, createdAt: users.createdAt })
    .from(users)
    .where(eq(users.id, userId));
  if (!profile) return undefined;
  const [classList, seats, practice, rhythm, invites, targets, mail, tokens, devices] = await Promise.all([
    db
      .select({ className: classes.name, role: memberships.role, joinedAt: memberships.createdAt })
      .from(memberships)
      .innerJoin(classes, eq(classes.id, memberships.classId))
      .where(eq(memberships.userId, userId)),
    db
      .select({ seatId: roomPlayers.id, roomId: rooms.id, nickname: roomPlayers.nickname, round: rooms.title, mode: rooms.mode, at: rooms.createdAt })
      .from(roomPlayers)
      .innerJoin(rooms, eq(rooms.id, roomPlayers.roomId))
      .where(eq(roomPlayers.userId, userId)),
    db.select().from(practiceAnswers).where(eq(practiceAnswers.userId, userId)),
    db.select().from(rhythmAttempts).where(eq(rhythmAttempts.userId, userId)),
    db
      .select({ className: classes.name, sentAt: invitations.createdAt, expiresAt: invitations.expiresAt, acceptedAt: invitations.acceptedAt, revokedAt: invitations.revokedAt })
      .from(invitations)
      .innerJoin(classes, eq(classes.id, invitations.classId))
      .where(eq(invitations.userId, userId)),
    db
      .select({ assignmentId: assignments.id, title: assignments.title, className: classes.name, dueAt: assignments.dueAt })
      .from(assignmentTargets)
      .innerJoin(assignments, eq(assignments.id, assignmentTargets.assignmentId))
      .innerJoin(classes, eq(classes.id, assignments.classId))
      .where(eq(assignmentTargets.userId, userId)),
    db.select({ kind: mailLog.kind, subjectId: mailLog.subjectId, sentAt: mailLog.sentAt }).from(mailLog).where(eq(mailLog.userId, userId)),
    listApiTokens(db, userId),
    listSessions(db, userId),
  ]);
  // The card's issue date only: its codes are kept hashed and are never exported.
  const [card] = await db.select({ issuedAt: signInCards.createdAt }).from(signInCards).where(eq(signInCards.userId, userId));
  const seatIds = seats.map((s) => s.seatId);
  const [roundAnswers, events] = seatIds.length
    ? await Promise.all([
        db.select().from(answers).where(inArray(answers.playerId, seatIds)),
        // Every record of a round's log that is about one of their seats (joins, answers, comings and goings).
        db
          .select({ roomId: roomEvents.roomId, seq: roomEvents.seq, at: roomEvents.at, event: roomEvents.event })
          .from(roomEvents)
          .where(inArray(sql`json_extract(${roomEvents.event}, '$.event.playerId')`, seatIds))
          .orderBy(roomEvents.roomId, roomEvents.seq),
      ])
    : [[], []];
  return {
    exportedAt: new Date().toISOString(),
    profile,
    classes: classList,
    rounds: seats.map((s) => ({
      ...s,
      answers: roundAnswers.filter((a) => a.playerId === s.seatId),
      events: events.filter((e) => e.roomId === s.roomId),
    })),
    practiceAnswers: practice,
    rhythmAttempts: rhythm,
    invitations: invites,
    assignedTo: targets,
    mailSent: mail,
    apiTokens: tokens,
    devices,
    signInCard: card ?? null,
  };
}

/** The admin's view of the school: each class with its join code and teacher ids, and each student with their classes. */
export async function schoolOverview(db: Db, orgId: string) {
  const [classRows, places, people] = await Promise.all([
    db.select({ id: classes.id, joinCode: classes.joinCode }).from(classes).where(eq(classes.orgId, orgId)),
    // Every class place in the school, read as a join (a correlated subquery in a sql template loses its
    // table names, which left every person's classes empty).
    db
      .select({ classId: memberships.classId, userId: memberships.userId, role: memberships.role, className: classes.name })
      .from(memberships)
      .innerJoin(classes, eq(classes.id, memberships.classId))
      .where(eq(classes.orgId, orgId))
      .orderBy(classes.name),
    db
      .select({
        id: users.id,
        displayName: users.displayName,
        email: users.email,
        role: users.role,
        hasPassword: sql<number>`${users.passwordHash} is not null`,
      })
      .from(users)
      .where(eq(users.orgId, orgId))
      .orderBy(users.displayName),
  ]);
  const classNames = (userId: string) => places.filter((p) => p.userId === userId).map((p) => p.className).join(", ");
  return {
    joinCodes: Object.fromEntries(classRows.map((c) => [c.id, c.joinCode])),
    teaching: places.filter((p) => p.role === "teacher").map(({ classId, userId }) => ({ classId, userId })),
    people: people.map((p) => ({ ...p, hasPassword: Boolean(p.hasPassword), classNames: classNames(p.id) })),
  };
}
