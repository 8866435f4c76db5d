// Classes, rosters and people: who may see a class, who is in it, and the admin's changes to the school.
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { nanoid } from "nanoid";
import { data } from "react-router";
import type { SessionUser } from "~/auth/users.server";
import type { Db } from "~/db/client.server";
import {
  answers,
  assignmentTargets,
  classes,
  invitations,
  memberships,
  practiceAnswers,
  rhythmAttempts,
  roomPlayers,
  rooms,
  users,
} from "~/db/schema";
import { looksLikeRoomCode, newJoinCode, normaliseJoinCode } from "./joinCode";
import { checkRosterRows, type CheckedRow, type RosterRow } from "./roster";
import { createInvitation, revokeInvitations } from "./invitations.server";

export interface ClassRecord {
  id: string;
  orgId: string;
  name: string;
  joinCode: string;
}

/**
 * A class's teachers and the school's admins may open it; anyone else gets a 404, not a hint that it
 * exists. Students are turned away earlier, by requireUserWithRole.
 */
export async function requireClassAccess(db: Db, user: SessionUser, classId: string): Promise<ClassRecord> {
  const [row] = await db
    .select({ id: classes.id, orgId: classes.orgId, name: classes.name, joinCode: classes.joinCode, teaches: memberships.userId })
    .from(classes)
    .leftJoin(
      memberships,
      and(eq(memberships.classId, classes.id), eq(memberships.userId, user.id), eq(memberships.role, "teacher")),
    )
    .where(and(eq(classes.id, classId), eq(classes.orgId, user.orgId)));
  if (!row || (user.role !== "admin" && !row.teaches)) throw data({ error: "No such class." }, { status: 404 });
  const { teaches: _omit, ...cls } = row;
  return cls;
}

export type SignInStatus = "nickname" | "active" | "invited" | "invite-expired";

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
    status: r.hasPassword ? "active" : !r.email ? "nickname" : r.inviteExpiresAt && r.inviteExpiresAt > now ? "invited" : "invite-expired",
    inviteExpiresAt: r.inviteExpiresAt ? new Date(r.inviteExpiresAt).toISOString() : null,
  }));
}

/** What the import needs to know about the e-mails in a batch: which belong to the school's students, which to nobody we may use. */
async function emailOwners(db: Db, orgId: string, emails: string[]) {
  const found = emails.length
    ? await db
        .select({ id: users.id, email: users.email, orgId: users.orgId, role: users.role, hasPassword: sql<number>`${users.passwordHash} is not null` })
        .from(users)
        .where(inArray(users.email, emails))
    : [];
  const reusable = new Map<string, { id: string; hasPassword: boolean }>();
  const blocked = new Map<string, string>();
  for (const u of found) {
    if (u.orgId === orgId && u.role === "student") reusable.set(u.email!, { id: u.id, hasPassword: Boolean(u.hasPassword) });
    else blocked.set(u.email!, "This e-mail belongs to another account that can't join as a student.");
  }
  return { reusable, blocked };
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
  return { checked, reusable: owners.reusable };
}

export interface InviteToSend {
  email: string;
  displayName: string;
  token: string;
}

/**
 * Adds checked rows to a class in one transaction: new students are created (nickname-only when
 * there is no e-mail); a student of the school who already has that e-mail is enrolled as they are.
 * Returns the invitations to mail, or the rows' errors when any row fails (nothing is stored then).
 */
export async function addStudents(
  db: Db,
  cls: ClassRecord,
  invitedBy: string,
  rows: readonly RosterRow[],
): Promise<{ ok: true; invites: InviteToSend[]; added: number } | { ok: false; rows: CheckedRow[] }> {
  const { checked, reusable } = await checkRowsForClass(db, cls, rows);
  if (rows.length === 0 || checked.some((r) => r.errors.length)) return { ok: false, rows: checked };
  const invites = await db.transaction(async (tx) => {
    const out: InviteToSend[] = [];
    for (const row of checked) {
      const existing = row.email ? reusable.get(row.email) : undefined;
      const userId = existing?.id ?? nanoid();
      if (!existing) {
        await tx.insert(users).values({
          id: userId,
          orgId: cls.orgId,
          role: "student",
          displayName: row.name,
          email: row.email || null,
        });
      }
      await tx.insert(memberships).values({ classId: cls.id, userId, role: "student" });
      if (row.email && !existing?.hasPassword) {
        const token = await createInvitation(tx, { userId, classId: cls.id, invitedBy });
        out.push({ email: row.email, displayName: row.name, token });
      }
    }
    return out;
  });
  return { ok: true, invites, added: checked.length };
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
    .where(and(eq(users.id, userId), eq(users.orgId, orgId), inArray(users.role, ["teacher", "admin"])));
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

/** A new teacher account, without a password until they accept the invitation to their first class. */
export async function addTeacher(db: Db, orgId: string, input: { displayName: string; email: string; classId: string }, invitedBy: string) {
  const id = nanoid();
  return db.transaction(async (tx) => {
    await tx.insert(users).values({ id, orgId, role: "teacher", displayName: input.displayName, email: input.email });
    await tx.insert(memberships).values({ classId: input.classId, userId: id, role: "teacher" });
    return { id, token: await createInvitation(tx, { userId: id, classId: input.classId, invitedBy }) };
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

/**
 * Deletes a student and everything that is theirs: the foreign keys cascade to memberships,
 * invitations, practice, rhythm attempts, assignment targets, tokens and mail log, and null the
 * account link of their seats in past rounds (the round's own figures stay for the class).
 */
export async function deleteStudent(db: Db, orgId: string, userId: string) {
  const gone = await db
    .delete(users)
    .where(and(eq(users.id, userId), eq(users.orgId, orgId), eq(users.role, "student")))
    .returning({ id: users.id });
  return gone.length > 0;
}

/** Everything Fretcall keeps about one person, for them or their school's admin to download. */
export async function exportPersonalData(db: Db, userId: string) {
  const [profile] = await db
    .select({ id: users.id, displayName: users.displayName, email: users.email, role: users.role, createdAt: users.createdAt })
    .from(users)
    .where(eq(users.id, userId));
  if (!profile) return undefined;
  const [classList, seats, practice, rhythm, invites, targets] = await Promise.all([
    db
      .select({ className: classes.name, role: memberships.role, joinedAt: memberships.createdAt })
      .from(memberships)
      .innerJoin(classes, eq(classes.id, memberships.classId))
      .where(eq(memberships.userId, userId)),
    db
      .select({ seatId: roomPlayers.id, nickname: roomPlayers.nickname, round: rooms.title, mode: rooms.mode, at: rooms.createdAt })
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
    db.select({ assignmentId: assignmentTargets.assignmentId }).from(assignmentTargets).where(eq(assignmentTargets.userId, userId)),
  ]);
  const roundAnswers = seats.length
    ? await db
        .select()
        .from(answers)
        .where(inArray(answers.playerId, seats.map((s) => s.seatId)))
    : [];
  return {
    exportedAt: new Date().toISOString(),
    profile,
    classes: classList,
    rounds: seats.map((s) => ({ ...s, answers: roundAnswers.filter((a) => a.playerId === s.seatId) })),
    practiceAnswers: practice,
    rhythmAttempts: rhythm,
    invitations: invites,
    assignedTo: targets,
  };
}

/** The admin's view of the school: each class with its join code and teacher ids, and each student with their classes. */
export async function schoolOverview(db: Db, orgId: string) {
  const [classRows, teaching, people] = await Promise.all([
    db.select({ id: classes.id, joinCode: classes.joinCode }).from(classes).where(eq(classes.orgId, orgId)),
    db
      .select({ classId: memberships.classId, userId: memberships.userId })
      .from(memberships)
      .innerJoin(classes, eq(classes.id, memberships.classId))
      .where(and(eq(classes.orgId, orgId), eq(memberships.role, "teacher"))),
    db
      .select({
        id: users.id,
        displayName: users.displayName,
        email: users.email,
        role: users.role,
        hasPassword: sql<number>`${users.passwordHash} is not null`,
        classNames: sql<string | null>`(select group_concat(${classes.name}, ', ') from ${memberships}
          join ${classes} on ${classes.id} = ${memberships.classId} where ${memberships.userId} = ${users.id})`,
      })
      .from(users)
      .where(eq(users.orgId, orgId))
      .orderBy(users.displayName),
  ]);
  return {
    joinCodes: Object.fromEntries(classRows.map((c) => [c.id, c.joinCode])),
    teaching,
    people: people.map((p) => ({ ...p, hasPassword: Boolean(p.hasPassword), classNames: p.classNames ?? "" })),
  };
}
