import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "~/auth/password.server";
import { assignments, classes, mailLog, memberships, organisations, practiceAnswers, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL as S } from "~/demo/school";
import { createAssignment } from "~/practice/assignments.server";
import { digestWeek, sendAssignmentNotices, sendDueReminders, sendWeeklyDigests, startMailSchedule } from "~/practice/mail.server";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

let server: TestServer;
const db = () => server.services.db;
const mailer = () => server.services.mailer;
const BASE = "https://fretcall.test";
const HOUR = 3_600_000;
const DAY = 24 * HOUR;

// A second school of our own, with fixed times, for the figures that must not depend on the demo's clock.
const OTHER = {
  org: "test-quarry",
  teacher: { id: "test-quarry-teacher", email: "marit@quarry.example", displayName: "Marit Quell" },
  admin: { id: "test-quarry-admin", email: "admin@quarry.example", displayName: "Ovid Quarrie" },
  cls: { id: "test-quarry-class", name: "Quarry Wednesday" },
  done: { id: "test-quarry-lio", email: "lio@quarry.example", displayName: "Lio P." },
  partway: { id: "test-quarry-ness", email: "ness@quarry.example", displayName: "Ness R." },
};
// Monday 7 December 2026, 09:00 UTC: the digest week runs Mon 30 Nov 07:00 – Mon 7 Dec 07:00 UTC.
const NOW = Date.UTC(2026, 11, 7, 9, 0);

const tueStudent = { id: "test-tue-extra", email: "juno@larkspur.example", displayName: "Juno E." };
const thuStudent = { id: "test-thu-extra", email: "kit@larkspur.example", displayName: "Kit W." };
const amani = "demo-student-1";

beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(db());
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db().batch([
    // Two more students with e-mail in the demo school: one in the Tuesday class, one in Thursday's.
    db().insert(users).values([
      { ...tueStudent, orgId: S.id, role: "student" },
      { ...thuStudent, orgId: S.id, role: "student" },
    ]),
    db().insert(memberships).values([
      { classId: "demo-class-tue", userId: tueStudent.id, role: "student" },
      { classId: "demo-class-thu", userId: thuStudent.id, role: "student" },
    ]),
    db().insert(organisations).values({ id: OTHER.org, name: "Quarry Road Guitar" }),
    db().insert(users).values([
      { ...OTHER.teacher, orgId: OTHER.org, role: "teacher", passwordHash },
      { ...OTHER.admin, orgId: OTHER.org, role: "admin", passwordHash },
      { ...OTHER.done, orgId: OTHER.org, role: "student", passwordHash },
      { ...OTHER.partway, orgId: OTHER.org, role: "student", passwordHash },
    ]),
    db().insert(classes).values({ ...OTHER.cls, orgId: OTHER.org, joinCode: "QRYWED" }),
    db().insert(memberships).values([
      { classId: OTHER.cls.id, userId: OTHER.teacher.id, role: "teacher" },
      { classId: OTHER.cls.id, userId: OTHER.done.id, role: "student" },
      { classId: OTHER.cls.id, userId: OTHER.partway.id, role: "student" },
    ]),
  ]);
});
afterAll(() => server.close());

const signIn = async (email: string) => {
  const client = new Client(server.url);
  const res = await client.post("/signin", { email, password: DEMO_PASSWORD });
  expect(res.status).toBe(302);
  return client;
};
/** Page text with React's escapes undone, so messages can be matched as written. */
const text = async (res: Response) => (await res.text()).replace(/&#x27;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, "&");
const count = async () => (await db().select().from(assignments)).length;
const futureLocal = (ms: number) => new Date(ms).toISOString().slice(0, 16);

/** Constructed practice: `pattern` reads "R" (home spot) and "x" (wide miss), one answer a minute from `start`. */
function practice(userId: string, assignmentId: string, pattern: string, start: number, ms = 1400) {
  return [...pattern].map((c, i) => ({
    userId,
    clientId: `${assignmentId}-${userId}-${start}-${i}`,
    assignmentId,
    source: "preset:ready-naturals-5",
    position: 5,
    tuning: "standard",
    written: i % 2 ? "G4" : "F4",
    writtenMidi: i % 2 ? 67 : 65,
    string: 4,
    fret: c === "R" ? 7 : 9,
    kind: c === "R" ? "home-spot" : "wide-miss",
    pitchRight: c === "R",
    reactionMs: ms,
    at: new Date(start + i * 60_000),
  }));
}

describe("who may see assignments", () => {
  const tuePage = "/teach/classes/demo-class-tue/assignments";
  const tueNew = "/teach/classes/demo-class-tue/assignments/new";
  const tueApi = "/api/v1/classes/demo-class-tue/assignments";

  it("sends a signed-out visitor to sign in, and the API answers 401", async () => {
    const anon = new Client(server.url);
    expect((await anon.get(tuePage)).status).toBe(302);
    expect((await anon.get(tueNew)).headers.get("location")).toContain("/signin?redirectTo=");
    expect((await anon.get(tueApi)).status).toBe(401);
    expect((await anon.get("/api/v1/me/assignments")).status).toBe(401);
  });

  it("refuses students the teacher side (403) and gives them their own list", async () => {
    const student = await signIn(S.studentWithSignIn.email);
    for (const path of [tuePage, tueNew, tueApi]) expect((await student.get(path)).status).toBe(403);
    expect((await student.post(tuePage, { intent: "delete", id: "demo-assignment-tue" })).status).toBe(403);
    const mine = await student.get("/api/v1/me/assignments");
    expect(mine.status).toBe(200);
    const body = (await mine.json()) as { assignments: { id: string; className: string; practiceUrl: string }[] };
    expect(body.assignments.map((a) => a.id)).toEqual(["demo-assignment-tue"]);
    expect(body.assignments[0]!.practiceUrl).toMatch(/\/me\/practice\?assignment=demo-assignment-tue$/);
  });

  it("lets a teacher see only their own classes; the school's others are 403, unknown ones 404", async () => {
    const rafe = await signIn(S.teachers[0].email);
    expect((await rafe.get(tuePage)).status).toBe(200);
    expect((await rafe.get(tueApi)).status).toBe(200);
    expect((await rafe.get("/teach/classes/demo-class-sat/assignments")).status).toBe(403);
    expect((await rafe.get("/teach/classes/demo-class-sat/assignments/new")).status).toBe(403);
    expect((await rafe.get("/api/v1/classes/demo-class-sat/assignments")).status).toBe(403);
    expect((await rafe.get("/api/v1/classes/no-such-class/assignments")).status).toBe(404);
    // Deleting another teacher's assignment: 403, and it stays.
    expect((await rafe.post("/teach/classes/demo-class-sat/assignments", { intent: "delete", id: "demo-assignment-sat" })).status).toBe(403);
    expect(await db().select().from(assignments).where(eq(assignments.id, "demo-assignment-sat"))).toHaveLength(1);
    expect((await rafe.get("/api/v1/me/assignments")).status).toBe(403);
  });

  it("lets an admin see every class of the school, and no other school's", async () => {
    const admin = await signIn(S.admin.email);
    for (const c of S.classes) expect((await admin.get(`/api/v1/classes/${c.id}/assignments`)).status).toBe(200);
    expect((await admin.get("/teach/classes/demo-class-sat/assignments")).status).toBe(200);
    expect((await admin.get(`/api/v1/classes/${OTHER.cls.id}/assignments`)).status).toBe(404);
    expect((await admin.get(`/teach/classes/${OTHER.cls.id}/assignments/new`)).status).toBe(404);
    const otherAdmin = await signIn(OTHER.admin.email);
    expect((await otherAdmin.get(`/api/v1/classes/${OTHER.cls.id}/assignments`)).status).toBe(200);
    expect((await otherAdmin.get(tueApi)).status).toBe(404);
  });

  it("shows the demo class's progress on the teacher's page, done and not done", async () => {
    const rafe = await signIn(S.teachers[0].email);
    const page = await text(await rafe.get(tuePage));
    expect(page).toContain("Naturals in fifth position");
    expect(page).toMatch(/\d of 9 done/);
    expect(page).toContain("Not started");
    expect(page).toContain("Done");
  });
});

describe("setting an assignment", () => {
  const newPath = "/teach/classes/demo-class-tue/assignments/new";
  const valid = () => ({
    material: "preset:ready-naturals-5",
    title: "",
    audience: "class",
    goalNotes: "40",
    goalAccuracy: "90",
    goalSeconds: "2",
    due: futureLocal(Date.now() + 3 * DAY),
    tzOffset: "0",
  });

  it.each([
    [{ material: "" }, "Choose what to practise: a reading set, a ready-made set or a tune."],
    [{ goalNotes: "lots" }, "Notes: a whole number from 5 to 500."],
    [{ goalNotes: "2" }, "Notes: a whole number from 5 to 500."],
    [{ goalAccuracy: "120" }, "Percent correct: a whole number from 50 to 100."],
    [{ goalSeconds: "0.1" }, "Median time: at least 0.5 s, or leave it empty."],
    [{ due: "" }, "Choose a due date and time."],
    [{ due: "2026-02-30T18:00" }, "That date doesn't exist. Choose a due date and time."],
    [{ due: futureLocal(Date.now() - HOUR) }, "The due date has to be in the future."],
    [{ due: futureLocal(Date.now() + 400 * DAY) }, "The due date is more than a year away. Check the year."],
    [{ audience: "chosen" }, "Choose at least one student, or set it for the whole class."],
    [{ material: "preset:no-such-preset" }, "That reading set or tune isn't available to this class. Choose another."],
    [{ material: "tune:someone-elses-tune" }, "That reading set or tune isn't available to this class. Choose another."],
    [{ audience: "chosen", students: "demo-student-20" }, "Some of the chosen students are not in this class any more. Choose again."],
  ])("refuses %o with a clear message, keeps what was typed, and stores and mails nothing", async (override, message) => {
    const rafe = await signIn(S.teachers[0].email);
    const before = { rows: await count(), mail: (await server.mail()).length };
    const res = await rafe.post(newPath, { ...valid(), title: "Kept title", ...override });
    expect(res.status).toBe(200);
    const page = await text(res);
    expect(page).toContain(message);
    expect(page).toContain("Nothing was saved yet.");
    expect(page).toContain('value="Kept title"');
    expect(await count()).toBe(before.rows);
    expect((await server.mail()).length).toBe(before.mail);
  });

  it("stores it, mails a notice to each targeted student with an e-mail, once, and lists it", async () => {
    const rafe = await signIn(S.teachers[0].email);
    const res = await rafe.post(newPath, { ...valid(), material: "tune:lantern-walk", title: "Lantern Walk by Friday", goalNotes: "24", goalAccuracy: "85", goalSeconds: "" });
    expect(res.status).toBe(302);
    const location = res.headers.get("location")!;
    const id = /set=([^&]+)/.exec(location)![1]!;
    expect(location).toContain("mailed=2");
    const [row] = await db().select().from(assignments).where(eq(assignments.id, id));
    expect(row).toMatchObject({ classId: "demo-class-tue", tuneId: "lantern-walk", presetId: null, readingSetId: null, goalNotes: 24, goalAccuracy: 85, goalMedianMs: null, createdBy: S.teachers[0].id });

    const notices = (await server.mail()).filter((m) => m.subject === "New assignment: Lantern Walk by Friday");
    // The whole Tuesday class: Amani and Juno have e-mail; Kit is in Thursday's class and gets nothing.
    expect(notices.map((m) => m.to[0]).sort()).toEqual([S.studentWithSignIn.email, tueStudent.email].sort());
    const juno = notices.find((m) => m.to[0] === tueStudent.email)!;
    expect(juno.text).toContain("Hello Juno E.,");
    expect(juno.text).toContain(`${S.teachers[0].displayName} set an assignment for Tuesday Beginners: Lantern Walk by Friday.`);
    expect(juno.text).toContain("What to practise: Lantern Walk (tune)");
    expect(juno.text).toContain("Goal: 24 notes in a row at 85 % correct");
    expect(juno.text).toContain(`/me/practice?assignment=${id}`);
    expect(await db().select().from(mailLog).where(and(eq(mailLog.kind, "assignment-notice"), eq(mailLog.subjectId, id)))).toHaveLength(2);

    // The scheduled pass finds nothing left to send for it.
    expect(await sendAssignmentNotices(db(), mailer(), Date.now(), BASE, id)).toEqual({ sent: 0, failed: 0 });

    const page = await text(await rafe.get(location));
    expect(page).toContain("Assignment set. A notice was e-mailed to 2 students.");
    expect(page).toContain("Lantern Walk by Friday");
    expect(page).toContain("0 of 9 done");

    // The student sees it on /me, with the Practise link.
    const student = await signIn(S.studentWithSignIn.email);
    const home = await text(await student.get("/me"));
    expect(home).toContain("Open assignments");
    expect(home).toContain("Lantern Walk by Friday");
    expect(home).toContain(`href="/me/practice?assignment=${id}"`);
  });

  it("sets it for chosen students only, who alone see it", async () => {
    const rafe = await signIn(S.teachers[0].email);
    const body = new URLSearchParams({ ...valid(), title: "Just for Juno", audience: "chosen" });
    body.append("students", tueStudent.id);
    const res = await rafe.request(newPath, { method: "POST", body });
    expect(res.headers.get("location")).toContain("mailed=1");
    const id = /set=([^&]+)/.exec(res.headers.get("location")!)![1]!;
    expect((await server.mail()).filter((m) => m.subject === "New assignment: Just for Juno").map((m) => m.to[0])).toEqual([tueStudent.email]);
    const amaniSees = await (await (await signIn(S.studentWithSignIn.email)).get("/api/v1/me/assignments")).json();
    expect(amaniSees.assignments.map((a: { id: string }) => a.id)).not.toContain(id);
    const api = await (await rafe.get("/api/v1/classes/demo-class-tue/assignments")).json();
    expect(api.assignments.find((a: { id: string }) => a.id === id)).toMatchObject({ audience: "chosen", targeted: 1, students: [{ userId: tueStudent.id, status: "open" }] });
  });

  it("deletes one, keeping the practice done for it", async () => {
    const rafe = await signIn(S.teachers[0].email);
    const before = (await db().select().from(practiceAnswers).where(eq(practiceAnswers.assignmentId, "demo-assignment-thu"))).length;
    expect(before).toBeGreaterThan(0);
    const res = await rafe.post("/teach/classes/demo-class-thu/assignments", { intent: "delete", id: "demo-assignment-thu" });
    expect(await text(res)).toContain("Assignment deleted.");
    expect(await db().select().from(assignments).where(eq(assignments.id, "demo-assignment-thu"))).toHaveLength(0);
    expect((await db().select().from(practiceAnswers).where(eq(practiceAnswers.userId, "demo-student-9"))).length).toBeGreaterThan(0);
    expect(await text(await rafe.post("/teach/classes/demo-class-thu/assignments", { intent: "delete", id: "demo-assignment-thu" }))).toContain("That assignment doesn't exist any more.");
  });
});

describe("progress and completion from practice", () => {
  let id: string;
  beforeAll(async () => {
    const teacher = { id: OTHER.teacher.id, orgId: OTHER.org, role: "teacher" as const, displayName: OTHER.teacher.displayName, email: OTHER.teacher.email };
    const created = await createAssignment(
      db(),
      teacher,
      { id: OTHER.cls.id, orgId: OTHER.org },
      { title: "Ten clean notes", material: { kind: "preset", id: "ready-naturals-5" }, students: [], goal: { notes: 10, accuracyPct: 90, medianMs: 2000 }, dueAt: NOW + 3 * DAY },
      NOW - 5 * DAY,
    );
    if (!created.ok) throw new Error(JSON.stringify(created.errors));
    id = created.id;
    const start = NOW - 2 * DAY;
    await db().insert(practiceAnswers).values([
      // Lio: xx then ten right. Windows of 10 close at answer 10 (8/10), 11 (9/10 = 90 % → done), so
      // completion is answer 11, at start + 10 min.
      ...practice(OTHER.done.id, id, "xxRRRRRRRRRR", start),
      // Ness: six answers, five right: part way (6 of 10 notes, 83 %).
      ...practice(OTHER.partway.id, id, "RRxRRR", start),
      // Free practice (no assignment) never counts.
      ...practice(OTHER.partway.id, null as unknown as string, "RRRRRRRRRR", start + HOUR).map((r) => ({ ...r, clientId: `free-${r.clientId}` })),
    ]);
  });

  it("gives the teacher each student's figures and completion in the API and on the page", async () => {
    const marit = await signIn(OTHER.teacher.email);
    const api = await (await marit.get(`/api/v1/classes/${OTHER.cls.id}/assignments`)).json();
    const a = api.assignments.find((x: { id: string }) => x.id === id);
    expect(a).toMatchObject({ title: "Ten clean notes", done: 1, targeted: 2, goal: { notes: 10, accuracyPct: 90, medianMs: 2000 }, audience: "class" });
    const lio = a.students.find((s: { userId: string }) => s.userId === OTHER.done.id);
    expect(lio).toMatchObject({ status: "done", late: false, progress: { answered: 12, notes: 10, correct: 9, medianMs: 1400, completedAt: new Date(NOW - 2 * DAY + 10 * 60_000).toISOString() } });
    const ness = a.students.find((s: { userId: string }) => s.userId === OTHER.partway.id);
    // Real time is before the fixed due date (Dec 2026), so the assignment is still open for Ness.
    expect(ness).toMatchObject({ progress: { answered: 6, notes: 6, correct: 5, completedAt: null, met: { notes: false, accuracy: false, speed: true } } });
    const page = await text(await marit.get(`/teach/classes/${OTHER.cls.id}/assignments`));
    expect(page).toContain("1 of 2 done");
    expect(page).toContain("10 of 10 notes · 90 % correct ✓ · median 1.4 s ✓");
    expect(page).toContain('aria-valuetext="Done · 10 of 10 notes');
    expect(page).toContain("6 of 10 notes · 83 % correct (goal 90 %) · median 1.4 s ✓");
  });

  it("shows the student their own progress only", async () => {
    const ness = await signIn(OTHER.partway.email);
    const mine = await (await ness.get("/api/v1/me/assignments")).json();
    expect(mine.assignments).toHaveLength(1);
    expect(mine.assignments[0]).toMatchObject({ id, className: OTHER.cls.name, progress: { answered: 6 } });
    expect(JSON.stringify(mine)).not.toContain(OTHER.done.displayName);
  });
});

describe("reminders before the due time", () => {
  it("go once, to targeted students with an e-mail who are not done yet", async () => {
    const rafe = { id: S.teachers[0].id, orgId: S.id, role: "teacher" as const, displayName: S.teachers[0].displayName, email: S.teachers[0].email };
    const cls = { id: "demo-class-tue", orgId: S.id };
    const goal = { notes: 10, accuracyPct: 90, medianMs: null };
    const make = async (title: string, dueAt: number, createdAt: number) => {
      const r = await createAssignment(db(), rafe, cls, { title, material: { kind: "preset", id: "ready-g-major-5" }, students: [amani, tueStudent.id], goal, dueAt }, createdAt);
      if (!r.ok) throw new Error("not created");
      return r.id;
    };
    // Due in 20 hours, set three days ago: reminder due. Due in three days: not yet. Due in 10 hours but
    // set only 2 hours ago: the notice has just said it, so no reminder.
    const soon = await make("G major check", NOW + 20 * HOUR, NOW - 3 * DAY);
    const later = await make("G major later", NOW + 3 * DAY, NOW - 3 * DAY);
    const fresh = await make("G major fresh", NOW + 10 * HOUR, NOW - 2 * HOUR);
    // Juno has already done "G major check".
    await db().insert(practiceAnswers).values(practice(tueStudent.id, soon, "RRRRRRRRRR", NOW - DAY));

    // Other assignments of this file may fall in the window too (their due dates follow the real clock), so
    // only this test's own reminders are counted.
    expect((await sendDueReminders(db(), mailer(), NOW, BASE)).failed).toBe(0);
    const reminders = (await server.mail()).filter((m) => m.subject.startsWith("Reminder: G major"));
    expect(reminders).toHaveLength(1);
    expect(reminders[0]!.to).toEqual([S.studentWithSignIn.email]);
    expect(reminders[0]!.subject).toBe("Reminder: G major check is due Tue, 8 Dec 2026, 05:00 UTC");
    expect(reminders[0]!.text).toContain("So far: Not started");
    expect(reminders[0]!.text).toContain(`${BASE}/me/practice?assignment=${soon}`);

    // Again a quarter of an hour later: nothing new.
    await sendDueReminders(db(), mailer(), NOW + 15 * 60_000, BASE);
    expect((await server.mail()).filter((m) => m.subject.startsWith("Reminder: G major"))).toHaveLength(1);
    const [row] = await db().select().from(assignments).where(eq(assignments.id, soon));
    expect(row!.remindedAt?.getTime()).toBe(NOW);
    for (const quiet of [later, fresh]) expect(await db().select().from(mailLog).where(and(eq(mailLog.kind, "assignment-reminder"), eq(mailLog.subjectId, quiet)))).toHaveLength(0);
  });
});

describe("the weekly digest", () => {
  it("names the week", () => {
    expect(digestWeek(NOW)).toEqual({ start: Date.UTC(2026, 10, 30, 7), end: Date.UTC(2026, 11, 7, 7), id: "2026-12-07" });
    // Monday before 07:00 UTC still belongs to the week before.
    expect(digestWeek(Date.UTC(2026, 11, 7, 6, 59)).id).toBe("2026-11-30");
    expect(digestWeek(Date.UTC(2026, 11, 13, 23, 0)).id).toBe("2026-12-07");
  });

  it("tells each teacher of their classes' practice, assignments and notes to reteach, once a week", async () => {
    // In the digest week: Ness plays F4 badly (the pattern's even answers are F4): "xRxRxRxRxR" = F4 five times,
    // all wrong; G4 five times, all right. F4 has 5 answers (enough to judge) at 0 % → to reteach.
    await db().insert(practiceAnswers).values(practice(OTHER.partway.id, null as unknown as string, "xRxRxRxRxR", NOW - 3 * DAY).map((r) => ({ ...r, clientId: `digest-${r.clientId}` })));

    const run = await sendWeeklyDigests(db(), mailer(), NOW, BASE);
    expect(run.failed).toBe(0);
    const digests = (await server.mail()).filter((m) => m.subject.startsWith("Your classes this week"));
    // Marit, Rafe and Saoirse teach classes; admins without a class of their own get none.
    expect(digests.map((m) => m.to[0]).sort()).toEqual([OTHER.teacher.email, S.teachers[0].email, S.teachers[1].email].sort());
    const marit = digests.find((m) => m.to[0] === OTHER.teacher.email)!;
    expect(marit.subject).toBe("Your classes this week: practice and assignments (Mon, 30 Nov 2026 to Mon, 7 Dec 2026)");
    expect(marit.text).toContain("== Quarry Wednesday (2 students)");
    // Lio: 12 answers two days before NOW; Ness: 6 + 10 free + 10 digest answers = 26. 38 in all.
    expect(marit.text).toContain("Practice: 2 of 2 students practised, 38 answers in all.");
    expect(marit.text).toContain("- Ten clean notes, due Thu, 10 Dec 2026, 09:00 UTC: 1 of 2 done. Not done yet: Ness R.\n");
    // F4 is every even-numbered answer (index 0, 2, …): Lio "xxRRRRRRRRRR" → x,R,R,R,R,R; Ness "RRxRRR" → R,x,R;
    // Ness free 5 × R; Ness digest 5 × x. F4: 19 answers, 5 + 2 + 5 + 0 = 12 right → 12/19 = 63 % < 80 %
    // → "not read yet", most common mistake wide miss. G4 (odd indices): Lio x,R,R,R,R,R; Ness R,R,R; free
    // 5 × R; digest 5 × R → 6 + 3 + 5 + 5 = 19 answers, 18 right = 95 % ≥ 80 %: the review's rule fills the list with the
    // slowest of the rest, so G4 follows as "slow to find", its one mistake a wide miss.
    expect(marit.text).toContain(
      "Notes to reteach (home spot counts as correct): F4 (63 % correct, not read yet, often “wide miss”); G4 (95 % correct, slow to find, often “wide miss”).",
    );
    expect(marit.text).toContain(`${BASE}/teach/classes/${OTHER.cls.id}/assignments`);
    const rafe = digests.find((m) => m.to[0] === S.teachers[0].email)!;
    expect(rafe.text).toContain("== Thursday Improvers");
    expect(rafe.text).toContain("== Tuesday Beginners");

    // Once a week: the same week again sends nothing; the next week sends again.
    expect(await sendWeeklyDigests(db(), mailer(), NOW + HOUR, BASE)).toEqual({ sent: 0, failed: 0 });
    expect((await sendWeeklyDigests(db(), mailer(), NOW + 7 * DAY, BASE)).sent).toBe(3);
  });
});

describe("the schedule", () => {
  // Last in the file: its passes run at the real time and mail whatever is due then.
  it("runs the passes on its interval, sending a notice to a student who joined after the assignment was set, and stops", async () => {
    const late = { id: "test-tue-late", email: "lark@larkspur.example", displayName: "Lark N." };
    await db().batch([
      db().insert(users).values({ ...late, orgId: S.id, role: "student" }),
      db().insert(memberships).values({ classId: "demo-class-tue", userId: late.id, role: "student" }),
    ]);
    const schedule = startMailSchedule(db(), mailer(), BASE, 100);
    await expect
      .poll(async () => (await server.mail()).filter((m) => m.to[0] === late.email).map((m) => m.subject).sort(), { timeout: 10_000 })
      // The whole-class assignments of the Tuesday class still open: the demo's, and the one set above.
      .toEqual(["New assignment: Lantern Walk by Friday", "New assignment: Naturals in fifth position"]);
    await schedule.stop();
    const after = (await server.mail()).length;
    await new Promise((done) => setTimeout(done, 300));
    expect((await server.mail()).length).toBe(after);
  });
});
