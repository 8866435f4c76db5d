// Every "may this user see or change this thing" rule, in one place; the rules and why are in
// docs/decisions/0005-access-rules.md. Each question (`canTeachClass`, `readingSetAccess`, `tuneAccess`,
// `canReadStudent`, `canExportPerson`, the round's) answers "ok", "forbidden" (the thing is in the user's
// school but not theirs to see or change) or "missing" (no such thing in their school: another school's
// things are never admitted to exist). The `require…` wrappers throw 404 or 403 — JSON for the API,
// the app's error boundary for pages — and return the thing.
import { and, eq, inArray } from "drizzle-orm";
import { data } from "react-router";
import type { Db } from "~/db/client.server";
import { classes, memberships, readingSets, rooms, tunes, users, type Role } from "~/db/schema";
import { readingPreset } from "~/reading/presets";
import { builtinTune } from "~/tunes/builtin";
import type { SessionUser } from "./users.server";

export type Access = "ok" | "forbidden" | "missing";

const verdict = (inSchool: boolean, allowed: boolean): Access => (!inSchool ? "missing" : allowed ? "ok" : "forbidden");

const FORBIDDEN = {
  class: "Only the class's teachers and the school's admins may open this class.",
  round: "Only the round's host, its class's teachers and the school's admins may open this round.",
  "reading set": "Only its author, its class's teachers and the school's admins may change this reading set. Copy it to make your own.",
  tune: "Only the teacher who uploaded a tune and the school's admins may change it; built-in tunes can't be changed.",
  student: "Only the student, their class's teachers and the school's admins may see this student's data.",
  person: "Only the person and their school's admins may download this data.",
} as const;

/** Throws the refusal for a verdict that isn't "ok": 404 without a hint, or 403 with the rule in words. */
function enforce(access: Access, what: keyof typeof FORBIDDEN) {
  if (access === "ok") return;
  const headers = { "Cache-Control": "private, no-store" };
  if (access === "missing") throw data({ error: `No such ${what}.` }, { status: 404, headers });
  throw data({ error: FORBIDDEN[what] }, { status: 403, statusText: "Forbidden", headers });
}

/**
 * Who may teach: teachers, and admins too — a new studio's admin is its first teacher, so they can be
 * given classes and host rounds. Every "is this account a teacher" check asks this.
 */
export const TEACHING_ROLES = ["teacher", "admin"] as const satisfies readonly Role[];
export const mayTeach = (role: Role) => (TEACHING_ROLES as readonly Role[]).includes(role);

async function teaches(db: Db, userId: string, classId: string) {
  const [row] = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.classId, classId), eq(memberships.userId, userId), eq(memberships.role, "teacher")));
  return Boolean(row);
}

// ---- classes ---------------------------------------------------------------------------------------

export interface ClassRecord {
  id: string;
  orgId: string;
  name: string;
  joinCode: string;
}

async function classWithAccess(db: Db, user: SessionUser, classId: string) {
  const [cls] = await db
    .select({ id: classes.id, orgId: classes.orgId, name: classes.name, joinCode: classes.joinCode })
    .from(classes)
    .where(and(eq(classes.id, classId), eq(classes.orgId, user.orgId)));
  const allowed = Boolean(cls) && (user.role === "admin" || (user.role === "teacher" && (await teaches(db, user.id, classId))));
  return { cls, access: verdict(Boolean(cls), allowed) };
}

/**
 * Teaching a class — its roster, review, exports, assignments, home-spot maps, rounds and sets for it, and its
 * students' sign-in cards and the devices those cards signed in: its teachers (every one of them) and the school's admins.
 */
export async function canTeachClass(db: Db, user: SessionUser, classId: string): Promise<Access> {
  return (await classWithAccess(db, user, classId)).access;
}

export async function requireClassTeacher(db: Db, user: SessionUser, classId: string): Promise<ClassRecord> {
  const { cls, access } = await classWithAccess(db, user, classId);
  enforce(access, "class");
  return cls!;
}

/** Whether a set or a round may be filed under this class (none = the whole school, always allowed). */
export async function mayFileUnderClass(db: Db, user: SessionUser, classId: string | null | undefined) {
  return !classId || (await canTeachClass(db, user, classId)) === "ok";
}

// ---- rounds ----------------------------------------------------------------------------------------

/** A round — its stage, results, live review and "host again": its host, the teachers of its class and the school's admins. */
async function roundWithAccess(db: Db, user: SessionUser, roomId: string) {
  const [room] = await db.select().from(rooms).where(and(eq(rooms.id, roomId), eq(rooms.orgId, user.orgId)));
  const allowed =
    Boolean(room) &&
    user.role !== "student" &&
    (room!.hostUserId === user.id || user.role === "admin" || (room!.classId !== null && (await teaches(db, user.id, room!.classId))));
  return { room, access: verdict(Boolean(room), allowed) };
}

export async function requireRound(db: Db, user: SessionUser, roomId: string) {
  const { room, access } = await roundWithAccess(db, user, roomId);
  enforce(access, "round");
  return room!;
}

// ---- reading sets ----------------------------------------------------------------------------------

type Intent = "see" | "edit";

/**
 * A saved reading set. Seeing it (and hosting, copying): any teacher for a school-wide set, the class's teachers for
 * a class's set. Changing or deleting it: a class's set by any of its teachers, a school-wide set by its author only.
 * Admins: all of the school's. Ready-made sets: every teacher may use them, nobody may change them.
 */
export async function readingSetAccess(db: Db, user: SessionUser, id: string, intent: Intent): Promise<Access> {
  if (readingPreset(id)) return user.role !== "student" && intent === "see" ? "ok" : "forbidden";
  const [set] = await db
    .select({ classId: readingSets.classId, createdBy: readingSets.createdBy })
    .from(readingSets)
    .where(and(eq(readingSets.id, id), eq(readingSets.orgId, user.orgId)));
  if (!set) return "missing";
  if (user.role === "admin") return "ok";
  if (user.role !== "teacher") return "forbidden";
  const ofClass = set.classId !== null && (await teaches(db, user.id, set.classId));
  const see = set.classId === null || ofClass;
  return verdict(true, intent === "edit" ? see && (ofClass || set.createdBy === user.id) : see);
}

export async function requireReadingSet(db: Db, user: SessionUser, id: string, intent: Intent) {
  enforce(await readingSetAccess(db, user, id, intent), "reading set");
}

// ---- tunes -----------------------------------------------------------------------------------------

/**
 * A tune. Seeing it: everyone in its school (teachers host it, students take its rhythm pass). Changing or
 * deleting an upload: the teacher who uploaded it and the school's admins. Built-in tunes belong to every
 * school and to nobody: all may play them, none may change them.
 */
export async function tuneAccess(db: Db, user: SessionUser, tuneId: string, intent: Intent): Promise<Access> {
  if (builtinTune(tuneId)) return intent === "see" ? "ok" : "forbidden";
  const [tune] = await db.select({ createdBy: tunes.createdBy }).from(tunes).where(and(eq(tunes.id, tuneId), eq(tunes.orgId, user.orgId)));
  if (!tune) return "missing";
  return verdict(true, intent === "see" || user.role === "admin" || (user.role === "teacher" && tune.createdBy === user.id));
}

export async function requireTune(db: Db, user: SessionUser, tuneId: string, intent: Intent) {
  enforce(await tuneAccess(db, user, tuneId, intent), "tune");
}

// ---- students and their data -----------------------------------------------------------------------

/**
 * Reading a student's data (practice, progress): the student themself, a teacher of one of their
 * classes, the school's admins. An id that isn't a student of the viewer's school is "missing".
 */
export async function canReadStudent(db: Db, viewer: SessionUser, studentId: string): Promise<Access> {
  if (viewer.id === studentId) return "ok";
  const [student] = await db
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.id, studentId), eq(users.orgId, viewer.orgId), eq(users.role, "student")));
  if (!student) return "missing";
  if (viewer.role === "admin") return "ok";
  if (viewer.role !== "teacher") return "forbidden";
  const theirs = db.select({ classId: memberships.classId }).from(memberships).where(eq(memberships.userId, studentId));
  const [shared] = await db
    .select({ classId: memberships.classId })
    .from(memberships)
    .where(and(eq(memberships.userId, viewer.id), eq(memberships.role, "teacher"), inArray(memberships.classId, theirs)))
    .limit(1);
  return verdict(true, Boolean(shared));
}

export async function requireStudentReader(db: Db, viewer: SessionUser, studentId: string) {
  enforce(await canReadStudent(db, viewer, studentId), "student");
}

/** Downloading everything kept about a person: the person themself, and for a student their school's admins. */
export async function canExportPerson(db: Db, viewer: SessionUser, userId: string): Promise<Access> {
  if (viewer.id === userId) return "ok";
  const [person] = await db.select({ role: users.role }).from(users).where(and(eq(users.id, userId), eq(users.orgId, viewer.orgId)));
  return verdict(Boolean(person), viewer.role === "admin" && person?.role === "student");
}

export async function requirePersonExport(db: Db, viewer: SessionUser, userId: string) {
  enforce(await canExportPerson(db, viewer, userId), "person");
}
