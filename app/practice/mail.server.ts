/**
 * The e-mails around assignments, each sent once (mail_log's key is kind + subject + recipient):
 * - **notice** to each targeted student with an e-mail when an assignment is set (and, on the next
 *   scheduled pass, to a student who joins the class while a whole-class assignment is still open);
 * - **reminder** REMINDER_LEAD_MS before the due time, to targeted students not done yet. Assignments
 *   set less than REMINDER_LEAD_MS before their due time get none: the notice has just said it.
 * - **weekly digest** to each teacher with an e-mail, of the classes they teach, once a week for the
 *   week ending Monday DIGEST_HOUR_UTC:00 UTC (the first pass after that moment sends it).
 *
 * The functions take `now` and the public address for links, so tests call them with a fixed time.
 * A mail is claimed in mail_log before it is sent; a failed send gives the claim back, so the next
 * pass tries again, and two servers sharing a database can't both send it.
 */
import { and, eq, gt, gte, inArray, isNotNull, isNull, lt, lte, sql } from "drizzle-orm";
import { memoryLocks, type Locks } from "~/cluster/shared.server";
import type { Db } from "~/db/client.server";
import { assignments, classes, mailLog, memberships, practiceAnswers, users } from "~/db/schema";
import type { Mailer, OutgoingMail } from "~/mail/mailer.server";
import { MISTAKE_LABELS, type MistakeKind } from "~/music/mistakes";
import { noteName } from "~/review/format";
import { schoolNaming } from "~/school/naming.server";
import { reteachList } from "~/review/stats";
import { classAssignmentsPath, MATERIAL_WORDS, practicePath } from "./assignmentForm";
import { assignmentViews, classStudents, type AssignmentView } from "./assignments.server";
import { goalWords, progressWords } from "./progress";
import { noteCells } from "./summary";
import { plural } from "~/lib/plural";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
export const REMINDER_LEAD_MS = DAY;
export const DIGEST_HOUR_UTC = 7;
export const SCHEDULE_EVERY_MS = 15 * 60_000;

export type MailKind = "assignment-notice" | "assignment-reminder" | "weekly-digest";

export interface MailRun {
  sent: number;
  failed: number;
}

const dateTime = new Intl.DateTimeFormat("en-GB", {
  weekday: "short",
  day: "numeric",
  month: "short",
  year: "numeric",
  hour: "2-digit",
  minute: "2-digit",
  timeZone: "UTC",
});
const dateOnly = new Intl.DateTimeFormat("en-GB", { weekday: "short", day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
/** Mails can't know the reader's time zone, so times in them say UTC. */
export const mailTime = (ms: number) => `${dateTime.format(ms)} UTC`;

/** Claims the mail in mail_log, then sends it; a failed send gives the claim back. */
async function sendOnce(db: Db, mailer: Mailer, key: { kind: MailKind; subjectId: string; userId: string }, mail: OutgoingMail, now: number, run: MailRun) {
  const claimed = await db.insert(mailLog).values({ ...key, sentAt: new Date(now) }).onConflictDoNothing().returning({ kind: mailLog.kind });
  if (claimed.length === 0) return;
  try {
    await mailer.send(mail);
    run.sent++;
  } catch (error) {
    run.failed++;
    console.error(`Could not send the ${key.kind} mail (${key.subjectId}) to ${key.userId}:`, error);
    await db.delete(mailLog).where(and(eq(mailLog.kind, key.kind), eq(mailLog.subjectId, key.subjectId), eq(mailLog.userId, key.userId)));
  }
}

/** Class names and who set each assignment, for the mails' wording. */
async function contextOf(db: Db, list: readonly { classId: string; createdBy: string | null }[]) {
  const classIds = [...new Set(list.map((a) => a.classId))];
  const setters = [...new Set(list.flatMap((a) => (a.createdBy ? [a.createdBy] : [])))];
  const [classRows, setterRows] = await Promise.all([
    classIds.length ? db.select({ id: classes.id, name: classes.name, orgId: classes.orgId }).from(classes).where(inArray(classes.id, classIds)) : [],
    setters.length ? db.select({ id: users.id, name: users.displayName }).from(users).where(inArray(users.id, setters)) : [],
  ]);
  return { className: new Map(classRows.map((c) => [c.id, c.name])), orgOf: new Map(classRows.map((c) => [c.id, c.orgId])), setter: new Map(setterRows.map((u) => [u.id, u.name])) };
}

const materialLine = (v: AssignmentView) =>
  v.material ? `What to practise: ${v.material.name} (${MATERIAL_WORDS[v.material.kind]})` : "What to practise: ask your teacher (the reading set was removed)";

/** Notices for open assignments (or just the one given) to targeted students with an e-mail who have none yet. */
export async function sendAssignmentNotices(db: Db, mailer: Mailer, now: number, baseUrl: string, assignmentId?: string): Promise<MailRun> {
  const run: MailRun = { sent: 0, failed: 0 };
  const list = await db
    .select()
    .from(assignments)
    .where(and(gt(assignments.dueAt, new Date(now)), assignmentId ? eq(assignments.id, assignmentId) : undefined));
  if (list.length === 0) return run;
  const [views, ctx] = await Promise.all([assignmentViews(db, list, now), contextOf(db, list)]);
  for (const v of views) {
    const a = list.find((x) => x.id === v.id)!;
    const setter = (a.createdBy && ctx.setter.get(a.createdBy)) || "Your teacher";
    for (const s of v.students) {
      if (!s.email || s.status === "done") continue;
      await sendOnce(
        db,
        mailer,
        { kind: "assignment-notice", subjectId: v.id, userId: s.userId },
        {
          orgId: ctx.orgOf.get(v.classId) ?? null,
          to: s.email,
          subject: `New assignment: ${v.title}`,
          text: [
            `Hello ${s.displayName},`,
            "",
            `${setter} set an assignment for ${ctx.className.get(v.classId) ?? "your class"}: ${v.title}.`,
            "",
            materialLine(v),
            `Goal: ${goalWords(v.goal)}`,
            `Due: ${mailTime(v.dueAt)}`,
            "",
            "Practise it here (only practice from this link counts toward the assignment):",
            `${baseUrl}${practicePath(v.id)}`,
            "",
            "Short sessions work best. Rest your hands between them, and keep headphones at a moderate volume.",
            "",
          ].join("\n"),
        },
        now,
        run,
      );
    }
  }
  return run;
}

/** Reminders for assignments due within REMINDER_LEAD_MS, to targeted students with an e-mail who are not done. */
export async function sendDueReminders(db: Db, mailer: Mailer, now: number, baseUrl: string): Promise<MailRun> {
  const run: MailRun = { sent: 0, failed: 0 };
  const list = await db
    .select()
    .from(assignments)
    .where(
      and(
        isNull(assignments.remindedAt),
        gt(assignments.dueAt, new Date(now)),
        lte(assignments.dueAt, new Date(now + REMINDER_LEAD_MS)),
        // Set within the lead time: the notice has only just gone out.
        lte(assignments.createdAt, sql`${assignments.dueAt} - ${REMINDER_LEAD_MS}`),
      ),
    );
  if (list.length === 0) return run;
  const [views, ctx] = await Promise.all([assignmentViews(db, list, now), contextOf(db, list)]);
  for (const v of views) {
    const before = run.failed;
    for (const s of v.students) {
      if (!s.email || s.status === "done") continue;
      await sendOnce(
        db,
        mailer,
        { kind: "assignment-reminder", subjectId: v.id, userId: s.userId },
        {
          orgId: ctx.orgOf.get(v.classId) ?? null,
          to: s.email,
          subject: `Reminder: ${v.title} is due ${mailTime(v.dueAt)}`,
          text: [
            `Hello ${s.displayName},`,
            "",
            `Your assignment for ${ctx.className.get(v.classId) ?? "your class"}, ${v.title}, is due ${mailTime(v.dueAt)}.`,
            "",
            `Goal: ${goalWords(v.goal)}`,
            `So far: ${progressWords(v.goal, s.progress)}`,
            "",
            "Practise it here:",
            `${baseUrl}${practicePath(v.id)}`,
            "",
          ].join("\n"),
        },
        now,
        run,
      );
    }
    // Marked once every reminder of the assignment went out; after a failure the next pass retries the rest.
    if (run.failed === before) await db.update(assignments).set({ remindedAt: new Date(now) }).where(eq(assignments.id, v.id));
  }
  return run;
}

/** The digest week that has most recently ended at `now`: [start, end), end = a Monday at DIGEST_HOUR_UTC:00 UTC. */
export function digestWeek(now: number): { start: number; end: number; id: string } {
  const d = new Date(now);
  const daysSinceMonday = (d.getUTCDay() + 6) % 7;
  let end = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - daysSinceMonday, DIGEST_HOUR_UTC);
  if (end > now) end -= 7 * DAY;
  return { start: end - 7 * DAY, end, id: new Date(end).toISOString().slice(0, 10) };
}

/** Ends with one full stop, also after a name that ends in an initial ("Ness R."). */
const sentence = (text: string) => (text.endsWith(".") ? text : `${text}.`);

/** One class's part of a digest, as lines of text, naming notes as its school does. */
async function classSection(db: Db, cls: { id: string; name: string; orgId: string }, week: { start: number; end: number }, now: number, baseUrl: string) {
  const [students, naming] = await Promise.all([classStudents(db, cls.id), schoolNaming(db, cls.orgId)]);
  const ids = students.map((s) => s.id);
  const [list, practice] = await Promise.all([
    db.select().from(assignments).where(and(eq(assignments.classId, cls.id), gte(assignments.dueAt, new Date(week.start)))),
    ids.length
      ? db
          .select()
          .from(practiceAnswers)
          .where(and(inArray(practiceAnswers.userId, ids), gte(practiceAnswers.at, new Date(week.start)), lt(practiceAnswers.at, new Date(week.end))))
      : [],
  ]);
  const views = await assignmentViews(db, list, now);
  const practised = new Set(practice.map((p) => p.userId)).size;
  const lines = [`== ${cls.name} (${students.length} ${students.length === 1 ? "student" : "students"})`];
  lines.push(
    practice.length === 0
      ? "Practice: nobody practised this week."
      : `Practice: ${practised} of ${plural(students.length, "student")} practised, ${plural(practice.length, "answer")} in all.`,
  );
  if (views.length === 0) lines.push("Assignments: none open or due this week.");
  else {
    lines.push("Assignments:");
    for (const v of [...views].sort((a, b) => a.dueAt - b.dueAt)) {
      const notDone = v.students.filter((s) => s.status !== "done").map((s) => s.displayName);
      const when = v.dueAt <= now ? `was due ${mailTime(v.dueAt)}` : `due ${mailTime(v.dueAt)}`;
      lines.push(`- ${v.title}, ${when}: ${v.done} of ${v.students.length} done.${notDone.length ? ` Not done yet: ${sentence(notDone.join(", "))}` : " Everyone is done ✓"}`);
    }
  }
  // Solo practice's own note cells (home spot = correct) through the class review's reteach rule.
  const reteach = reteachList(noteCells(practice.map((p) => ({ ...p, at: p.at.getTime() })), () => null));
  if (reteach.length === 0) lines.push("Notes to reteach: too little practice this week to say.");
  else {
    const words = reteach.map((r) => {
      const mistake = r.commonMistake ? `, often “${MISTAKE_LABELS[r.commonMistake as MistakeKind]}”` : "";
      return `${noteName(r.written, naming)} (${Math.round(r.accuracy * 100)} % correct, ${r.reason}${mistake})`;
    });
    lines.push(`Notes to reteach (home spot counts as correct): ${words.join("; ")}.`);
  }
  lines.push(`Open the class's assignments: ${baseUrl}${classAssignmentsPath(cls.id)}`);
  return lines;
}

/** The digest of the week just ended to each teacher with an e-mail who teaches at least one class. */
export async function sendWeeklyDigests(db: Db, mailer: Mailer, now: number, baseUrl: string): Promise<MailRun> {
  const run: MailRun = { sent: 0, failed: 0 };
  const week = digestWeek(now);
  const rows = await db
    .select({ userId: users.id, orgId: users.orgId, displayName: users.displayName, email: users.email, classId: classes.id, className: classes.name })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .innerJoin(classes, eq(classes.id, memberships.classId))
    .leftJoin(mailLog, and(eq(mailLog.kind, "weekly-digest"), eq(mailLog.subjectId, week.id), eq(mailLog.userId, users.id)))
    .where(and(eq(memberships.role, "teacher"), isNotNull(users.email), isNull(mailLog.userId)));
  const teachers = new Map<string, { orgId: string; displayName: string; email: string; classes: { id: string; name: string }[] }>();
  for (const r of rows) {
    const t = teachers.get(r.userId) ?? { orgId: r.orgId, displayName: r.displayName, email: r.email!, classes: [] };
    t.classes.push({ id: r.classId, name: r.className });
    teachers.set(r.userId, t);
  }
  const sections = new Map<string, Promise<string[]>>();
  const sectionOf = (c: { id: string; name: string; orgId: string }) => {
    if (!sections.has(c.id)) sections.set(c.id, classSection(db, c, week, now, baseUrl));
    return sections.get(c.id)!;
  };
  const period = `${dateOnly.format(week.start)} to ${dateOnly.format(week.end)}`;
  for (const [userId, t] of teachers) {
    const parts = await Promise.all(t.classes.sort((a, b) => a.name.localeCompare(b.name)).map((c) => sectionOf({ ...c, orgId: t.orgId })));
    await sendOnce(
      db,
      mailer,
      { kind: "weekly-digest", subjectId: week.id, userId },
      {
        orgId: t.orgId,
        to: t.email,
        subject: `Your classes this week: practice and assignments (${period})`,
        text: [`Hello ${t.displayName},`, "", `How your classes practised from ${period}.`, "", ...parts.flatMap((p) => [...p, ""])].join("\n"),
      },
      now,
      run,
    );
  }
  return run;
}

/**
 * Runs the three passes every SCHEDULE_EVERY_MS (first pass after one interval, so a server started
 * for a test sends nothing by itself). Started and stopped by server/index.ts. Of several nodes one
 * runs each pass (`locks`); the claims in mail_log would keep a mail single anyway, the lock spares
 * the others the queries.
 */
export function startMailSchedule(db: Db, mailer: Mailer, baseUrl: string, every = SCHEDULE_EVERY_MS, locks: Locks = memoryLocks()) {
  let current: Promise<void> | undefined;
  const pass = async () => {
    const now = Date.now();
    for (const send of [sendAssignmentNotices, sendDueReminders, sendWeeklyDigests]) {
      try {
        await send(db, mailer, now, baseUrl);
      } catch (error) {
        console.error(`Scheduled ${send.name} failed:`, error);
      }
    }
  };
  const timer = setInterval(() => {
    current ??= locks
      .ifFree("mail-schedule", pass)
      .then(() => undefined)
      .finally(() => (current = undefined));
  }, every);
  timer.unref();
  return {
    /** Stops the timer and waits for a pass under way, so the database isn't closed beneath it. */
    async stop() {
      clearInterval(timer);
      await current;
    },
  };
}
