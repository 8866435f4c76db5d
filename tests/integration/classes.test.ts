import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken, revokeApiToken } from "~/auth/tokens.server";
import { invitations, memberships, roomPlayers, rooms, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { createClass } from "~/school/people.server";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";
import { testRoomConfig } from "../../server/scripted-rooms";

let server: TestServer;
const db = () => server.services.db;
const [RAFE, SAOIRSE] = DEMO_SCHOOL.teachers;
const TUE = "demo-class-tue";

beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(db());
});
afterAll(() => server.close());

async function signIn(email: string, password = DEMO_PASSWORD) {
  const client = new Client(server.url);
  const res = await client.post("/signin", { email, password });
  expect(res.status).toBe(302);
  return client;
}

const html = async (res: Response) => (await res.text()).replace(/&#x27;/g, "'");

function upload(client: Client, classId: string, csv: string) {
  const body = new FormData();
  body.set("intent", "preview");
  body.set("file", new File([csv], "roster.csv", { type: "text/csv" }));
  return client.request(`/teach/classes/${classId}`, { method: "POST", body });
}

/** The confirmed rows the preview offers, as the browser would send them back (ticked boxes only). */
function confirmedRows(page: string) {
  return [...page.matchAll(/<input[^>]*name="row"[^>]*>/g)]
    .map((m) => m[0])
    .filter((tag) => !tag.includes("disabled"))
    .map((tag) => /value="([^"]*)"/.exec(tag)![1]!.replace(/&quot;/g, '"').replace(/&amp;/g, "&"));
}

function importRows(client: Client, classId: string, rows: string[]) {
  const body = new URLSearchParams([["intent", "import"], ...rows.map((r) => ["row", r] as [string, string])]);
  return client.request(`/teach/classes/${classId}`, { method: "POST", body });
}

const studentsIn = async (classId: string) =>
  (
    await db()
      .select({ name: users.displayName, email: users.email })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.classId, classId), eq(memberships.role, "student")))
  )
    .map((r) => r.name)
    .sort();

/** The newest invitation mailed to an address; the catcher writes each message shortly after delivery. */
const inviteLink = async (to: string, skip?: string) => {
  let mail;
  for (let i = 0; i < 50 && !mail; i++) {
    mail = (await server.mail()).find((m) => m.to.some((t) => t.includes(to)) && (!skip || !m.text.includes(skip)));
    if (!mail) await new Promise((r) => setTimeout(r, 100));
  }
  expect(mail, `an invitation to ${to}`).toBeDefined();
  return new URL(mail!.text.match(/https?:\/\/\S+\/invite\/\S+/)![0]).pathname;
};

describe("role matrix: route × role → status", () => {
  const roles = {
    anonymous: undefined,
    student: DEMO_SCHOOL.studentWithSignIn.email,
    teacherOfClass: RAFE.email,
    otherTeacher: SAOIRSE.email,
    admin: DEMO_SCHOOL.admin.email,
  } as const;
  type R = keyof typeof roles;
  const self = "demo-student-1";
  // 302 = sent to sign in; 403 = wrong role, or the school's but not theirs; 404 = no such thing in their school.
  const table: [string, Record<R, number>][] = [
    ["/admin", { anonymous: 302, student: 403, teacherOfClass: 403, otherTeacher: 403, admin: 200 }],
    ["/admin/students/demo-student-2", { anonymous: 302, student: 403, teacherOfClass: 403, otherTeacher: 403, admin: 200 }],
    ["/admin/students/demo-teacher-rafe", { anonymous: 302, student: 403, teacherOfClass: 403, otherTeacher: 403, admin: 404 }],
    [`/teach/classes/${TUE}`, { anonymous: 302, student: 403, teacherOfClass: 200, otherTeacher: 403, admin: 200 }],
    ["/teach/classes/no-such-class", { anonymous: 302, student: 403, teacherOfClass: 404, otherTeacher: 404, admin: 404 }],
    ["/me", { anonymous: 302, student: 200, teacherOfClass: 403, otherTeacher: 403, admin: 403 }],
    ["/me/join-class", { anonymous: 302, student: 200, teacherOfClass: 403, otherTeacher: 403, admin: 403 }],
    ["/invite/not-a-real-token", { anonymous: 200, student: 200, teacherOfClass: 200, otherTeacher: 200, admin: 200 }],
    [`/people/${self}/export.json`, { anonymous: 302, student: 200, teacherOfClass: 403, otherTeacher: 403, admin: 200 }],
    ["/people/demo-student-2/export.json", { anonymous: 302, student: 403, teacherOfClass: 403, otherTeacher: 403, admin: 200 }],
    ["/api/v1/classes", { anonymous: 401, student: 200, teacherOfClass: 200, otherTeacher: 200, admin: 200 }],
    [`/api/v1/classes/${TUE}/roster`, { anonymous: 401, student: 403, teacherOfClass: 200, otherTeacher: 403, admin: 200 }],
  ];
  const clients: Partial<Record<R, Client>> = {};
  beforeAll(async () => {
    for (const [role, email] of Object.entries(roles) as [R, string | undefined][]) {
      clients[role] = email ? await signIn(email) : new Client(server.url);
    }
  });
  for (const [path, expected] of table) {
    for (const role of Object.keys(roles) as R[]) {
      it(`GET ${path} as ${role} → ${expected[role]}`, async () => {
        expect((await clients[role]!.get(path)).status).toBe(expected[role]);
      });
    }
  }

  it("refuses the class page's actions to another teacher, and changes nothing", async () => {
    const before = await studentsIn(TUE);
    const res = await clients.otherTeacher!.post(`/teach/classes/${TUE}`, { intent: "add", name: "Intruder X." });
    expect(res.status).toBe(403);
    expect(await studentsIn(TUE)).toEqual(before);
  });

  it("shows a teacher only their own classes in the API, and a student only theirs", async () => {
    const names = async (c: Client) => ((await (await c.get("/api/v1/classes")).json()) as { classes: { name: string }[] }).classes.map((x) => x.name);
    expect(await names(clients.otherTeacher!)).toEqual(["Saturday Youth Guitar"]);
    expect(await names(clients.student!)).toEqual(["Tuesday Beginners"]);
    expect((await names(clients.admin!)).length).toBe(3);
  });
});

describe("the school page", () => {
  it("lists each person's classes: a student's class, a teacher's two, a teacher's one", async () => {
    const admin = await signIn(DEMO_SCHOOL.admin.email);
    const page = (await html(await admin.get("/admin"))).replace(/<!-- -->/g, "");
    // The cells' text of the table row that starts with a person's name.
    const row = (name: string) => {
      const rows = [...page.matchAll(/<tr[^>]*>([\s\S]*?)<\/tr>/g)].map((m) => [...m[1]!.matchAll(/<t[hd][^>]*>([\s\S]*?)<\/t[hd]>/g)].map((c) => c[1]!.replace(/<[^>]+>/g, "")));
      const cells = rows.find((r) => r[0] === name);
      expect(cells, `a row for ${name}`).toBeDefined();
      return cells!;
    };
    expect(row("Amani K.")).toContain("Tuesday Beginners");
    expect(row("Quill E.")).toContain("Saturday Youth Guitar");
    expect(row(RAFE.displayName)).toContain("Thursday Improvers, Tuesday Beginners");
    expect(row(SAOIRSE.displayName)).toContain("Saturday Youth Guitar");
  });
});

describe("CSV import", () => {
  let classId = "";
  let teacher: Client;
  beforeAll(async () => {
    classId = (await createClass(db(), DEMO_SCHOOL.id, "CSV Test Class", RAFE.id)).id;
    teacher = await signIn(RAFE.email);
  });

  it("previews a good file with every row ready, stores nothing until confirmed, then imports it", async () => {
    const page = await html(await upload(teacher, classId, "name,email\nAlba R.,\nBeno S.,beno@example.org\n"));
    expect(page).toContain("2 of 2 rows can be imported");
    expect(await studentsIn(classId)).toEqual([]);
    const res = await importRows(teacher, classId, confirmedRows(page));
    expect(await html(res)).toContain("Imported 2 students.");
    expect(await studentsIn(classId)).toEqual(["Alba R.", "Beno S."]);
    // The nickname-only student keeps no e-mail; the other one is invited.
    const [alba] = await db().select().from(users).where(eq(users.displayName, "Alba R."));
    expect(alba?.email).toBeNull();
    expect(await inviteLink("beno@example.org")).toMatch(/^\/invite\//);
  });

  it("explains every problem of a bad file row by row and offers nothing to import", async () => {
    const csv = [
      "Name,E-mail",
      ",nobody@example.org",
      "Cato V.,not-an-address",
      `${"Z".repeat(61)},`,
      "Alba R.,",
      "Dita W.,beno@example.org",
      "Eske F.,eske@example.org",
      "eske f.,other@example.org",
      `Finn G.,${RAFE.email}`,
    ].join("\n");
    const page = await html(await upload(teacher, classId, csv));
    expect(page).toContain("1 of 8 rows can be imported");
    for (const message of [
      "Missing name.",
      "That doesn't look like an e-mail address.",
      "Keep a name under 60 characters.",
      "A student with this name is already in the class.",
      "A student with this e-mail is already in the class.",
      "Same name as line 7.",
      "This e-mail belongs to a teacher or admin of your school, who can't join as a student.",
    ]) {
      expect(page).toContain(message);
    }
    expect(confirmedRows(page)).toHaveLength(1);
  });

  it.each([
    ["an empty file", "", "Choose a CSV file to upload."],
    ["a file without a header", "Alba,alba@example.org\n", "The first line must name the columns"],
    ["a binary file", "name\n\u0000\u0001", "This isn't a CSV text file."],
  ])("refuses %s with a clear message", async (_what, csv, message) => {
    expect(await html(await upload(teacher, classId, csv))).toContain(message);
  });

  it("imports only the rows the teacher confirms from a mixed file", async () => {
    const page = await html(await upload(teacher, classId, "name\nGala H.\n\nHugo I.\nGala H.\nIvo J.\n"));
    expect(page).toContain("3 of 4 rows can be imported");
    expect(page).toContain("Same name as line 2.");
    const offered = confirmedRows(page);
    const chosen = offered.filter((r) => !r.includes("Hugo"));
    expect(await html(await importRows(teacher, classId, chosen))).toContain("Imported 2 students.");
    expect(await studentsIn(classId)).toEqual(["Alba R.", "Beno S.", "Gala H.", "Ivo J."]);
  });

  it("re-checks confirmed rows on the server and stores nothing when one fails", async () => {
    const rows = [JSON.stringify({ line: 2, name: "Juno K.", email: "" }), JSON.stringify({ line: 3, name: "Gala H.", email: "" })];
    const page = await html(await importRows(teacher, classId, rows));
    expect(page).toContain("Nothing was imported");
    expect(page).toContain("A student with this name is already in the class.");
    const tampered = await html(await importRows(teacher, classId, ['{"line":"x"}']));
    expect(tampered).toContain("damaged on the way");
    expect(await studentsIn(classId)).not.toContain("Juno K.");
  });

  it("adds a nickname-only student by hand, and refuses a duplicate", async () => {
    expect(await html(await teacher.post(`/teach/classes/${classId}`, { intent: "add", name: "Kit L.", email: "" }))).toContain("Added Kit L.");
    expect(await html(await teacher.post(`/teach/classes/${classId}`, { intent: "add", name: "kit l.", email: "" }))).toContain(
      "A student with this name is already in the class.",
    );
    expect((await studentsIn(classId)).filter((n) => n === "Kit L.")).toHaveLength(1);
  });
});

describe("invitations through the captured e-mail", () => {
  let classId = "";
  let teacher: Client;
  beforeAll(async () => {
    classId = (await createClass(db(), DEMO_SCHOOL.id, "Invite Test Class", RAFE.id)).id;
    teacher = await signIn(RAFE.email);
  });
  const add = (name: string, email: string) => teacher.post(`/teach/classes/${classId}`, { intent: "add", name, email });
  const password = { password: "a good long password", confirm: "a good long password" };

  it("sets a password, signs the student in to their class, and refuses the link a second time", async () => {
    await add("Lior M.", "lior@example.org");
    const link = await inviteLink("lior@example.org");
    expect(await html(await new Client(server.url).get(link))).toContain("Choose a password to join Invite Test Class");
    const student = new Client(server.url);
    const short = await student.post(link, { password: "short", confirm: "short" });
    expect(await html(short)).toContain("Use at least 10 characters.");
    const done = await student.post(link, password);
    expect(done.status).toBe(302);
    expect(done.headers.get("location")).toBe("/me");
    expect(await html(await student.get("/me"))).toContain("Invite Test Class");
    expect(await html(await new Client(server.url).get(link))).toContain("This invitation was already used.");
    const again = await new Client(server.url).post(link, { password: "another long password", confirm: "another long password" });
    expect(await html(again)).toContain("This invitation was already used.");
    expect((await new Client(server.url).post("/signin", { email: "lior@example.org", password: password.password })).status).toBe(302);
  });

  it("a resend replaces the old link", async () => {
    await add("Mika N.", "mika@example.org");
    const old = await inviteLink("mika@example.org");
    const [mika] = await db().select().from(users).where(eq(users.email, "mika@example.org"));
    expect(await html(await teacher.post(`/teach/classes/${classId}`, { intent: "resend", userId: mika!.id }))).toContain(
      "the previous link no longer works",
    );
    const fresh = await inviteLink("mika@example.org", old);
    expect(fresh).not.toBe(old);
    expect(await html(await new Client(server.url).post(old, password))).toContain("replaced by a newer one");
    expect((await new Client(server.url).post(fresh, password)).status).toBe(302);
  });

  it("refuses an expired link", async () => {
    await add("Nadia O.", "nadia@example.org");
    const link = await inviteLink("nadia@example.org");
    const [nadia] = await db().select().from(users).where(eq(users.email, "nadia@example.org"));
    await db().update(invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(invitations.userId, nadia!.id));
    expect(await html(await new Client(server.url).get(link))).toContain("This invitation has expired");
    expect(await html(await new Client(server.url).post(link, password))).toContain("This invitation has expired");
    const [after] = await db().select().from(users).where(eq(users.id, nadia!.id));
    expect(after?.passwordHash).toBeNull();
  });

  it("invites a new teacher, who then sees only their class", async () => {
    const admin = await signIn(DEMO_SCHOOL.admin.email);
    const res = await admin.post("/admin", { intent: "addTeacher", displayName: "Pim Quarles", email: "pim@example.org", classId });
    expect(await html(res)).toContain("Added Pim Quarles to Invite Test Class");
    const dup = await admin.post("/admin", { intent: "addTeacher", displayName: "Pim Again", email: "PIM@example.org", classId });
    expect(await html(dup)).toContain("Someone in your school already has this e-mail.");
    const link = await inviteLink("pim@example.org");
    const pim = new Client(server.url);
    const done = await pim.post(link, password);
    expect(done.headers.get("location")).toBe("/teach");
    const list = (await (await pim.get("/api/v1/classes")).json()) as { classes: { name: string }[] };
    expect(list.classes.map((c) => c.name)).toEqual(["Invite Test Class"]);
    expect((await pim.get(`/teach/classes/${TUE}`)).status).toBe(403);
  });

  it("lets a signed-in student join a class by its code", async () => {
    const student = await signIn(DEMO_SCHOOL.studentWithSignIn.email);
    const bad = await student.post("/me/join-class", { code: "nope-nope" });
    expect(await html(bad)).toContain("No class has the join code NOPENOPE");
    expect(await html(await student.post("/me/join-class", { code: "sat-yth" }))).toContain("You've joined Saturday Youth Guitar.");
    expect(await html(await student.post("/me/join-class", { code: "SATYTH" }))).toContain("You're already in Saturday Youth Guitar.");
  });

  it("gives a new class a join code that cannot be taken for a room code, found however it is typed", async () => {
    const { joinCode } = await createClass(db(), DEMO_SCHOOL.id, "Join Code Class", RAFE.id);
    expect(joinCode).toMatch(/^[A-Z]{4}-[0-9]{4}$/);
    const student = await signIn(DEMO_SCHOOL.studentWithSignIn.email);
    expect(await html(await student.post("/me/join-class", { code: joinCode.replace("-", " ").toLowerCase() }))).toContain("You've joined Join Code Class.");
    expect(await html(await student.post("/me/join-class", { code: "kmn prt" }))).toContain("KMNPRT looks like the room code of a live round");
  });
});

describe("API with a personal token", () => {
  it("answers with the token and 401 after it is revoked", async () => {
    const { id, token } = await createApiToken(db(), RAFE.id, "roster sync");
    const get = (path: string) => fetch(new URL(path, server.url), { headers: { Authorization: `Bearer ${token}` } });
    const classesRes = await get("/api/v1/classes");
    expect(classesRes.status).toBe(200);
    expect(((await classesRes.json()) as { classes: { id: string }[] }).classes.map((c) => c.id)).toContain(TUE);
    const roster = await get(`/api/v1/classes/${TUE}/roster`);
    expect(roster.status).toBe(200);
    const body = (await roster.json()) as { class: { joinCode: string }; students: { displayName: string }[] };
    expect(body.class.joinCode).toBe("TUEBEG");
    expect(body.students.map((s) => s.displayName)).toContain("Amani K.");
    expect((await get("/api/v1/classes/demo-class-sat/roster")).status).toBe(403);
    expect(await revokeApiToken(db(), RAFE.id, id)).toBe(true);
    expect((await get("/api/v1/classes")).status).toBe(401);
    expect((await get(`/api/v1/classes/${TUE}/roster`)).status).toBe(401);
  });
});

describe("removing and deleting students", () => {
  it("a teacher removes a student from the class; the account stays", async () => {
    const teacher = await signIn(RAFE.email);
    const res = await teacher.post(`/teach/classes/${TUE}`, { intent: "remove", userId: "demo-student-8" });
    expect(await html(res)).toContain("Removed from the class.");
    expect(await studentsIn(TUE)).not.toContain("Hollis B.");
    expect(await db().select().from(users).where(eq(users.id, "demo-student-8"))).toHaveLength(1);
  });

  it("the student exports their own data as JSON", async () => {
    const student = await signIn(DEMO_SCHOOL.studentWithSignIn.email);
    const res = await student.get("/people/demo-student-1/export.json");
    expect(res.headers.get("content-disposition")).toContain("attachment");
    const body = (await res.json()) as { profile: { displayName: string }; classes: { className: string }[] };
    expect(body.profile.displayName).toBe("Amani K.");
    expect(body.classes.map((c) => c.className)).toContain("Tuesday Beginners");
  });

  it("an admin deletes a student only after typing their name; memberships go, past round seats are unlinked", async () => {
    const victim = "demo-student-2";
    await db().insert(rooms).values({
      id: "room-delete-test",
      code: "DELTST",
      orgId: DEMO_SCHOOL.id,
      hostUserId: RAFE.id,
      classId: TUE,
      title: "Old round",
      mode: "sprint",
      position: 5,
      config: testRoomConfig("DELTST"),
      endedAt: new Date(),
    });
    await db().insert(roomPlayers).values({ id: "seat-delete-test", roomId: "room-delete-test", userId: victim, nickname: "Bram" });
    const admin = await signIn(DEMO_SCHOOL.admin.email);
    const wrong = await admin.post(`/admin/students/${victim}`, { confirmName: "Bram" });
    expect(await html(wrong)).toContain("type the student's name exactly as shown: Bram T.");
    expect(await db().select().from(users).where(eq(users.id, victim))).toHaveLength(1);
    const done = await admin.post(`/admin/students/${victim}`, { confirmName: "Bram T." });
    expect(done.status).toBe(302);
    expect(done.headers.get("location")).toBe("/admin?deleted=1");
    expect(await db().select().from(users).where(eq(users.id, victim))).toEqual([]);
    expect(await db().select().from(memberships).where(eq(memberships.userId, victim))).toEqual([]);
    const [seat] = await db().select().from(roomPlayers).where(eq(roomPlayers.id, "seat-delete-test"));
    expect(seat?.userId).toBeNull();
    expect((await admin.get(`/admin/students/${victim}`)).status).toBe(404);
  });
});
