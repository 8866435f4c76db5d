// Two schools built through the app's own pages, then every route of app/routes.ts tried as every role
// against school A's ids: the status each role gets, and no school-A name, e-mail or title in anything
// a school-B user (or a stranger) is shown. The rules are docs/decisions/0005-access-rules.md.
import type { RouteConfigEntry } from "@react-router/dev/routes";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import routes from "~/routes";
import * as schema from "~/db/schema";
import { PROTOCOL_VERSION } from "~/game/protocol";
import type { RoomConfig } from "~/game/roomConfig";
import { Client, startStudio, startTestServer, type TestServer } from "./harness";
import { openStage, ScriptedSocket, spotOf, untilShown } from "../../server/scripted-rooms";

const PASSWORD = "quarry-lantern-42";

// Every school-A string that must never reach school B: distinctive, so a hit is a real leak.
const A = {
  school: "Marigold Quarry Studio",
  admin: { name: "Ottoline Brackwater", email: "ottoline@marigold-quarry.example" },
  t1: { name: "Perpetua Vellacott", email: "perpetua@marigold-quarry.example" },
  t2: { name: "Barnaby Quenneville", email: "barnaby@marigold-quarry.example" },
  t3: { name: "Isembard Tollemache", email: "isembard@marigold-quarry.example" },
  sIn: { name: "Clementine Ashgrove", email: "clementine@marigold-quarry.example" },
  sOut: { name: "Leopold Fairweather", email: "leopold@marigold-quarry.example" },
  class1: "Marigold Tuesday Ensemble",
  class2: "Marigold Saturday Ensemble",
  set: "Marigold scales drill",
  tune: "Marigold Lantern Air",
  assignment: "Marigold homework",
  token: "Marigold gradebook sync",
};
const MARKERS = [
  A.school,
  ...[A.admin, A.t1, A.t2, A.t3, A.sIn, A.sOut].flatMap((p) => [p.name, p.email]),
  A.class1,
  A.class2,
  A.set,
  A.tune,
  A.assignment,
  A.token,
];
const B = {
  admin: { name: "Wilhelmina Corrigan", email: "wilhelmina@juniper-hall.example" },
  teacher: { name: "Thaddeus Pemberton", email: "thaddeus@juniper-hall.example" },
  student: { name: "Rosalind Haverford", email: "rosalind@juniper-hall.example" },
};

// A short melody written for this test (MusicXML 4.0 partwise).
const SCORE = `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part></part-list>
  <part id="P1">
    <measure number="1">
      <attributes><divisions>1</divisions><key><fifths>0</fifths></key><time><beats>4</beats><beat-type>4</beat-type></time></attributes>
      <note><pitch><step>C</step><octave>5</octave></pitch><duration>2</duration></note>
      <note><pitch><step>D</step><octave>5</octave></pitch><duration>2</duration></note>
    </measure>
  </part>
</score-partwise>`;

// A reading set's form as the page posts it (no lowest or highest note: the whole position).
const SET_FORM = { mode: "sprint", position: "5", tuning: "standard", frets: "15", keyFifths: "0", accidentals: "naturals", homeOnly: "on", prompts: "6", seconds: "10" };

const ROLES = ["anonymous", "adminA", "t1", "t2", "t3", "sIn", "sOut", "adminB", "teacherB", "studentB"] as const;
type Role = (typeof ROLES)[number];
const SCHOOL_B: readonly Role[] = ["adminB", "teacherB", "studentB"];

let server: TestServer;
const clients = {} as Record<Role, Client>;
const ids = {} as {
  orgA: string;
  class1: string;
  class2: string;
  joinCode1: string;
  classB: string;
  t1: string;
  sIn: string;
  set: string;
  tune: string;
  assignment: string;
  playedRoom: string;
  openRoom: string;
  openCode: string;
  tokenId: string;
  token: string;
  usedInvite: string;
};

const db = () => server.services.db;
const location = (res: Response) => res.headers.get("location") ?? "";

async function inviteLink(to: string) {
  const mail = (await server.mail()).find((m) => m.to.includes(to) && /\/invite\//.test(m.text));
  if (!mail) throw new Error(`no invitation for ${to}`);
  return new URL(mail.text.match(/https?:\/\/\S+\/invite\/\S+/)![0]).pathname;
}

/** Accepts the newest invitation mailed to `to`, which signs the new account in. */
async function accept(to: string) {
  const client = new Client(server.url);
  const path = await inviteLink(to);
  const res = await client.post(path, { password: PASSWORD, confirm: PASSWORD });
  expect(res.status).toBe(302);
  return { client, path };
}

/** Starts a studio as its admin would: the form, then the link mailed to confirm it. */
async function signUp(studio: string, person: { name: string; email: string }) {
  return startStudio(server, { studioName: studio, displayName: person.name, email: person.email, password: PASSWORD });
}

async function classId(orgId: string, name: string) {
  const [row] = await db().select().from(schema.classes).where(and(eq(schema.classes.orgId, orgId), eq(schema.classes.name, name)));
  return row!;
}

async function userId(email: string) {
  const [row] = await db().select({ id: schema.users.id, orgId: schema.users.orgId }).from(schema.users).where(eq(schema.users.email, email));
  return row!;
}

/** A whole round through the hub: the stage starts it, the signed-in student answers the first prompt, the stage ends it. */
async function playShortRound(roomId: string, student: Client) {
  const [room] = await db().select().from(schema.rooms).where(eq(schema.rooms.id, roomId));
  const config = room!.config as RoomConfig;
  const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room!);
  const pad = await ScriptedSocket.open(server.url, server.url, { Cookie: student.cookieHeader() });
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room!.code });
  await pad.next("welcome");
  pad.send({ type: "join", room: room!.code, nickname: "Pad one" });
  await pad.next("welcome", (m) => m.you !== null);
  stage.send({ type: "host", action: "start" });
  const prompt = await stage.next("prompt", (m) => m.index === 0);
  await untilShown(prompt.showAt);
  pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(config.prompts[0]!.home), tapAt: Date.now() });
  await pad.next("answer-ack");
  stage.send({ type: "host", action: "end" });
  await stage.next("ended");
  pad.ws.close();
  stage.ws.close();
}

beforeAll(async () => {
  // Mail captured by the server itself, so the admin's outbox page is there to be tried.
  server = await startTestServer({ MAIL_CAPTURE: "1" });
  clients.anonymous = new Client(server.url);

  // ---- school A, built as its people would ----
  clients.adminA = await signUp(A.school, A.admin);
  ids.orgA = (await userId(A.admin.email)).orgId;
  for (const name of [A.class1, A.class2]) expect((await clients.adminA.post("/admin", { intent: "createClass", name, teacherId: "" })).status).toBe(200);
  const c1 = await classId(ids.orgA, A.class1);
  ids.class1 = c1.id;
  ids.joinCode1 = c1.joinCode;
  ids.class2 = (await classId(ids.orgA, A.class2)).id;
  for (const [who, cls] of [[A.t1, ids.class1], [A.t2, ids.class1], [A.t3, ids.class2]] as const) {
    expect((await clients.adminA.post("/admin", { intent: "addTeacher", displayName: who.name, email: who.email, classId: cls })).status).toBe(200);
  }
  clients.t1 = (await accept(A.t1.email)).client;
  clients.t2 = (await accept(A.t2.email)).client;
  clients.t3 = (await accept(A.t3.email)).client;
  ids.t1 = (await userId(A.t1.email)).id;
  expect((await clients.t1.post(`/teach/classes/${ids.class1}`, { intent: "add", name: A.sIn.name, email: A.sIn.email })).status).toBe(200);
  expect((await clients.t3.post(`/teach/classes/${ids.class2}`, { intent: "add", name: A.sOut.name, email: A.sOut.email })).status).toBe(200);
  const sIn = await accept(A.sIn.email);
  clients.sIn = sIn.client;
  ids.usedInvite = sIn.path;
  clients.sOut = (await accept(A.sOut.email)).client;
  ids.sIn = (await userId(A.sIn.email)).id;

  const set = await clients.t1.post("/teach/sets/new", { ...SET_FORM, name: A.set, classId: ids.class1 });
  ids.set = new URL(location(set), server.url).searchParams.get("set")!;
  const form = new FormData();
  form.set("score", new File([SCORE], "lantern.musicxml"));
  form.set("title", A.tune);
  ids.tune = location(await clients.t1.request("/teach/tunes", { method: "POST", body: form })).split("/").pop()!;
  const assignment = await clients.t1.post(`/teach/classes/${ids.class1}/assignments/new`, {
    material: `set:${ids.set}`,
    title: A.assignment,
    audience: "class",
    goalNotes: "20",
    goalAccuracy: "80",
    goalSeconds: "",
    due: new Date(Date.now() + 3 * 86_400_000).toISOString().slice(0, 16),
    tzOffset: "0",
  });
  ids.assignment = new URL(location(assignment), server.url).searchParams.get("set")!;
  const token = await (await clients.t1.post("/settings/tokens", { intent: "create", name: A.token })).text();
  ids.token = token.match(/fcl_[A-Za-z0-9_-]+/)![0];
  [{ id: ids.tokenId }] = await db().select({ id: schema.apiTokens.id }).from(schema.apiTokens).where(eq(schema.apiTokens.userId, ids.t1));

  // A round hosted from the set and played to its end, and one left open.
  ids.playedRoom = location(await clients.t1.post("/host", { intent: "set", set: ids.set, classId: ids.class1 })).split("/").pop()!;
  await playShortRound(ids.playedRoom, clients.sIn);
  ids.openRoom = location(await clients.t1.post("/host", { intent: "set", set: ids.set, classId: ids.class1 })).split("/").pop()!;
  [{ code: ids.openCode }] = await db().select({ code: schema.rooms.code }).from(schema.rooms).where(eq(schema.rooms.id, ids.openRoom));

  // ---- school B ----
  clients.adminB = await signUp("Juniper Hall Guitar School", B.admin);
  const orgB = (await userId(B.admin.email)).orgId;
  await clients.adminB.post("/admin", { intent: "createClass", name: "Juniper Monday", teacherId: "" });
  ids.classB = (await classId(orgB, "Juniper Monday")).id;
  await clients.adminB.post("/admin", { intent: "addTeacher", displayName: B.teacher.name, email: B.teacher.email, classId: ids.classB });
  clients.teacherB = (await accept(B.teacher.email)).client;
  await clients.teacherB.post(`/teach/classes/${ids.classB}`, { intent: "add", name: B.student.name, email: B.student.email });
  clients.studentB = (await accept(B.student.email)).client;
}, 120_000);
afterAll(() => server?.close());

// ---- the matrix ----------------------------------------------------------------------------------------

type Statuses = Record<Role, number>;
const each = (status: number): Statuses => Object.fromEntries(ROLES.map((r) => [r, status])) as Statuses;
/** Pages for teachers and admins that name no school-A thing. */
const staffPage = (anonymous = 302): Statuses => ({ ...each(200), anonymous, sIn: 403, sOut: 403, studentB: 403 });
/** Pages for students that name no school-A thing. */
const studentPage = (anonymous = 302): Statuses => ({ ...each(403), anonymous, sIn: 200, sOut: 200, studentB: 200 });
/** A school-A class's teacher side: its two teachers and A's admin; another teacher of A 403; school B 404. */
const classPage = (anonymous = 302): Statuses => ({ ...each(403), anonymous, adminA: 200, t1: 200, t2: 200, adminB: 404, teacherB: 404 });
const signedIn = (anonymous = 302): Statuses => ({ ...each(200), anonymous });

/** Every route pattern of app/routes.ts → a path with school A's ids, and what each role gets. */
const MATRIX: Record<string, () => { path: string; expect: Statuses }> = {
  "/": () => ({ path: "/", expect: { ...each(302), anonymous: 200 } }),
  signup: () => ({ path: "/signup", expect: { ...each(302), anonymous: 200 } }),
  signin: () => ({ path: "/signin", expect: { ...each(302), anonymous: 200 } }),
  signout: () => ({ path: "/signout", expect: each(302) }),
  forgot: () => ({ path: "/forgot", expect: each(200) }),
  "reset/:token": () => ({ path: "/reset/not-a-live-token", expect: each(200) }),
  // A card's link that opens nothing says so to everyone alike.
  "card/:token": () => ({ path: "/card/not-a-live-card", expect: each(404) }),
  explore: () => ({ path: "/explore", expect: each(200) }),
  teach: () => ({ path: "/teach", expect: staffPage() }),
  "teach/classes/:classId": () => ({ path: `/teach/classes/${ids.class1}`, expect: classPage() }),
  "teach/classes/:classId/maps": () => ({ path: `/teach/classes/${ids.class1}/maps`, expect: classPage() }),
  "teach/sets": () => ({ path: "/teach/sets", expect: staffPage() }),
  "teach/sets/:id": () => ({ path: `/teach/sets/${ids.set}`, expect: classPage() }),
  "teach/classes/:classId/review": () => ({ path: `/teach/classes/${ids.class1}/review`, expect: classPage() }),
  "teach/classes/:classId/review/live": () => ({ path: `/teach/classes/${ids.class1}/review/live?round=${ids.playedRoom}`, expect: classPage() }),
  "teach/classes/:classId/students/:userId": () => ({ path: `/teach/classes/${ids.class1}/students/${ids.sIn}`, expect: classPage() }),
  "teach/classes/:classId/export.csv": () => ({ path: `/teach/classes/${ids.class1}/export.csv`, expect: classPage() }),
  "teach/classes/:classId/assignments": () => ({ path: `/teach/classes/${ids.class1}/assignments`, expect: classPage() }),
  "teach/classes/:classId/assignments/new": () => ({ path: `/teach/classes/${ids.class1}/assignments/new`, expect: classPage() }),
  "teach/classes/:classId/cards": () => ({ path: `/teach/classes/${ids.class1}/cards`, expect: classPage() }),
  "teach/classes/:classId/cards/print": () => ({ path: `/teach/classes/${ids.class1}/cards/print`, expect: classPage() }),
  me: () => ({ path: "/me", expect: studentPage() }),
  "me/join-class": () => ({ path: "/me/join-class", expect: studentPage() }),
  // A student is told only of assignments addressed to them: any other is "no such assignment for you".
  "me/practice": () => ({ path: `/me/practice?assignment=${ids.assignment}`, expect: { ...studentPage(), sOut: 404, studentB: 404 } }),
  "me/rhythm/:tuneId": () => ({ path: `/me/rhythm/${ids.tune}`, expect: { ...studentPage(), studentB: 404 } }),
  "invite/:token": () => ({ path: ids.usedInvite, expect: each(200) }),
  "people/:userId/export.json": () => ({
    path: `/people/${ids.sIn}/export.json`,
    expect: { ...each(403), anonymous: 302, adminA: 200, sIn: 200, adminB: 404, teacherB: 404, studentB: 404 },
  }),
  "settings/tokens": () => ({ path: "/settings/tokens", expect: staffPage() }),
  // Each user's own sessions and password: every signed-in role, nothing of anyone else's.
  "settings/devices": () => ({ path: "/settings/devices", expect: signedIn() }),
  "settings/password": () => ({ path: "/settings/password", expect: signedIn() }),
  "teach/tunes": () => ({ path: "/teach/tunes", expect: staffPage() }),
  "teach/tunes/:tuneId": () => ({ path: `/teach/tunes/${ids.tune}`, expect: { ...staffPage(), adminB: 404, teacherB: 404 } }),
  host: () => ({ path: `/host?class=${ids.class1}&set=${ids.set}`, expect: staffPage() }),
  "stage/:roomId": () => ({ path: `/stage/${ids.openRoom}`, expect: classPage() }),
  "results/:roomId": () => ({ path: `/results/${ids.playedRoom}`, expect: classPage() }),
  join: () => ({ path: `/join?code=${ids.openCode}`, expect: each(302) }),
  "play/:code": () => ({ path: `/play/${ids.openCode}`, expect: each(200) }),
  admin: () => ({ path: "/admin", expect: { ...each(403), anonymous: 302, adminA: 200, adminB: 200 } }),
  "admin/outbox": () => ({ path: "/admin/outbox", expect: { ...each(403), anonymous: 302, adminA: 200, adminB: 200 } }),
  "admin/students/:userId": () => ({ path: `/admin/students/${ids.sIn}`, expect: { ...each(403), anonymous: 302, adminA: 200, adminB: 404 } }),
  "api/v1/me": () => ({ path: "/api/v1/me", expect: signedIn(401) }),
  "api/v1/spots": () => ({ path: "/api/v1/spots?note=E5", expect: each(200) }),
  "api/v1/spot-map": () => ({ path: "/api/v1/spot-map?position=5", expect: each(200) }),
  "api/v1/practice/answers": () => ({
    path: `/api/v1/practice/answers?student=${ids.sIn}`,
    expect: { ...each(403), anonymous: 401, adminA: 200, t1: 200, t2: 200, sIn: 200, adminB: 404, teacherB: 404, studentB: 404 },
  }),
  "api/v1/practice/rhythm": () => ({ path: "/api/v1/practice/rhythm", expect: studentPage(401) }),
  "api/v1/reading-sets": () => ({ path: "/api/v1/reading-sets", expect: staffPage(401) }),
  "api/v1/reading-sets/:id": () => ({ path: `/api/v1/reading-sets/${ids.set}`, expect: classPage(401) }),
  "api/v1/tunes": () => ({ path: "/api/v1/tunes", expect: staffPage(401) }),
  "api/v1/tunes/:id": () => ({ path: `/api/v1/tunes/${ids.tune}`, expect: { ...staffPage(401), adminB: 404, teacherB: 404 } }),
  "api/v1/classes": () => ({ path: "/api/v1/classes", expect: signedIn(401) }),
  "api/v1/classes/:classId/roster": () => ({ path: `/api/v1/classes/${ids.class1}/roster`, expect: classPage(401) }),
  "api/v1/classes/:classId/results": () => ({ path: `/api/v1/classes/${ids.class1}/results`, expect: classPage(401) }),
  "api/v1/classes/:classId/assignments": () => ({ path: `/api/v1/classes/${ids.class1}/assignments`, expect: classPage(401) }),
  "api/v1/me/assignments": () => ({ path: "/api/v1/me/assignments", expect: studentPage(401) }),
  "api/v1/rounds/:roomId/results": () => ({ path: `/api/v1/rounds/${ids.playedRoom}/results`, expect: classPage(401) }),
  "api/v1/rounds/:roomId/stage": () => ({ path: `/api/v1/rounds/${ids.openRoom}/stage`, expect: classPage(401) }),
  "*": () => ({ path: "/no-such-page/anywhere", expect: each(404) }),
};

/** The route patterns of app/routes.ts, prefixes applied, the top index route as "/". */
function patterns(entries: readonly RouteConfigEntry[]): string[] {
  return entries.flatMap((e) => [e.path ?? "/", ...patterns(e.children ?? [])]);
}

/** Bodies seen by school B or a stranger, to search for school A's markers. */
const foreignBodies: { role: Role; what: string; body: string }[] = [];

async function look(role: Role, res: Response, what: string) {
  const body = await res.text();
  if (role === "anonymous" || SCHOOL_B.includes(role)) foreignBodies.push({ role, what, body });
  return body;
}

describe("every route × every role against school A's ids", () => {
  it("has a row for every route of app/routes.ts", () => {
    expect(Object.keys(MATRIX).sort()).toEqual(patterns(routes).sort());
  });

  it("gives each role the status the access rules say", async () => {
    const got: Record<string, Partial<Statuses>> = {};
    const want: Record<string, Partial<Statuses>> = {};
    for (const [pattern, row] of Object.entries(MATRIX)) {
      const { path, expect: statuses } = row();
      for (const role of ROLES) {
        const res = await clients[role].request(path, { headers: path.includes("/review/live") ? { Accept: "text/event-stream" } : {} });
        await look(role, res, `GET ${path}`);
        (got[pattern] ??= {})[role] = res.status;
        (want[pattern] ??= {})[role] = statuses[role];
      }
    }
    expect(got).toEqual(want);
  }, 240_000);
});

// ---- changes ----------------------------------------------------------------------------------------------

/** Every table a change could touch, to prove a refused change changed nothing. */
async function snapshot() {
  const tables = [
    schema.users,
    schema.classes,
    schema.memberships,
    schema.invitations,
    schema.readingSets,
    schema.spotMaps,
    schema.tunes,
    schema.rooms,
    schema.roomPlayers,
    schema.answers,
    schema.assignments,
    schema.assignmentTargets,
    schema.apiTokens,
    schema.practiceAnswers,
    schema.passwordResets,
    schema.signInCards,
  ];
  return JSON.stringify(await Promise.all(tables.map((t) => db().select().from(t))));
}

const refused = (extra: Partial<Statuses> = {}): Partial<Statuses> => ({ t3: 403, sOut: 403, adminB: 404, teacherB: 404, studentB: 403, ...extra });

/** Changes aimed at school A's things by those who may not make them: the status, and nothing changed anywhere. */
const CHANGES: { path: () => string; body: () => Record<string, string> | string; expect: Partial<Statuses> }[] = [
  { path: () => `/teach/classes/${ids.class1}`, body: () => ({ intent: "add", name: "Intruder Pupil", email: "" }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}`, body: () => ({ intent: "remove", userId: ids.sIn }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}`, body: () => ({ intent: "resend", userId: ids.sIn }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}/maps?position=5&tuning=standard`, body: () => ({ intent: "reset" }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}/cards/print`, body: () => ({ student: ids.sIn }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}/cards`, body: () => ({ intent: "end", id: "no-such-device" }), expect: refused() },
  { path: () => `/teach/classes/${ids.class1}/assignments`, body: () => ({ intent: "delete", id: ids.assignment }), expect: refused() },
  {
    path: () => `/teach/classes/${ids.class1}/assignments/new`,
    body: () => ({ material: "preset:ready-naturals-5", title: "Intruder work", audience: "class", goalNotes: "20", goalAccuracy: "80", goalSeconds: "", due: new Date(Date.now() + 86_400_000).toISOString().slice(0, 16), tzOffset: "0" }),
    expect: refused(),
  },
  { path: () => `/teach/sets/${ids.set}`, body: () => ({ intent: "delete" }), expect: refused() },
  { path: () => `/teach/sets/${ids.set}`, body: () => ({ ...SET_FORM, name: "Hijacked set", classId: "" }), expect: refused() },
  { path: () => "/teach/sets", body: () => ({ intent: "delete", id: ids.set }), expect: refused() },
  { path: () => "/teach/sets", body: () => ({ intent: "copy", id: ids.set, classId: "" }), expect: refused() },
  // Only the teacher who uploaded a tune (and the admins) may delete it.
  { path: () => `/teach/tunes/${ids.tune}`, body: () => ({ intent: "delete" }), expect: refused({ t2: 403 }) },
  { path: () => "/host", body: () => ({ intent: "again", roomId: ids.playedRoom }), expect: refused() },
  { path: () => "/host", body: () => ({ intent: "set", set: ids.set, classId: "" }), expect: refused() },
  // A form's choice of class: answered in the form ("You don't teach that class"), nothing opened.
  { path: () => "/host", body: () => ({ ...SET_FORM, teams: "2", classId: ids.class1 }), expect: refused({ t3: 200, adminB: 200, teacherB: 200 }) },
  { path: () => `/admin/students/${ids.sIn}`, body: () => ({ confirmName: A.sIn.name }), expect: { t1: 403, sIn: 403, adminB: 404, teacherB: 403, studentB: 403 } },
  // The school page's forms name their class and teacher: another school's are "not one of yours", in the form.
  { path: () => "/admin", body: () => ({ intent: "renameClass", classId: ids.class1, name: "Hijacked class" }), expect: { t1: 403, adminB: 200, teacherB: 403, studentB: 403 } },
  { path: () => "/admin", body: () => ({ intent: "assign", classId: ids.class1, teacherId: ids.t1 }), expect: { adminB: 200 } },
  { path: () => "/admin", body: () => ({ intent: "resendTeacher", userId: ids.t1 }), expect: { adminB: 200 } },
  { path: () => "/me/join-class", body: () => ({ code: ids.joinCode1 }), expect: { studentB: 200 } },
  { path: () => "/settings/tokens", body: () => ({ intent: "revoke", id: ids.tokenId }), expect: { adminA: 200, t2: 200, adminB: 200, studentB: 403 } },
  {
    path: () => "/api/v1/practice/answers",
    body: () =>
      JSON.stringify({
        answers: [{ clientId: "tenancy-probe-000000001", source: "preset:ready-naturals-5", position: 5, tuning: "standard", keyFifths: 0, written: "C5", string: 3, fret: 5, reactionMs: 1400, at: Date.now(), classId: ids.class1 }],
      }),
    expect: { sOut: 400, studentB: 400 },
  },
];

describe("changes to school A's things by anyone not allowed", () => {
  it("are refused and change nothing", async () => {
    const before = await snapshot();
    const got: Record<string, Partial<Statuses>> = {};
    const want: Record<string, Partial<Statuses>> = {};
    for (const change of CHANGES) {
      const body = change.body();
      const key = `POST ${change.path()} ${typeof body === "string" ? "json" : (body.intent ?? "")}`;
      for (const [role, status] of Object.entries(change.expect) as [Role, number][]) {
        const res =
          typeof body === "string"
            ? await clients[role].request(change.path(), { method: "POST", body, headers: { "Content-Type": "application/json" } })
            : await clients[role].post(change.path(), body);
        await look(role, res, key);
        (got[key] ??= {})[role] = res.status;
        (want[key] ??= {})[role] = status;
      }
    }
    expect(got).toEqual(want);
    expect(await snapshot()).toBe(before);
    // The teacher's token still works, for their own class only.
    const bearer = { headers: { Authorization: `Bearer ${ids.token}` } };
    expect((await clients.anonymous.request(`/api/v1/classes/${ids.class1}/roster`, bearer)).status).toBe(200);
    expect((await clients.anonymous.request(`/api/v1/classes/${ids.classB}/roster`, bearer)).status).toBe(404);
  });
});

describe("mail", () => {
  it("lists in an admin's outbox only their own school's mail, never another school's password reset", async () => {
    // The attack: a new studio asks for a reset of school A's admin and reads the link in its own outbox.
    expect((await clients.adminB.post("/forgot", { email: A.admin.email })).status).toBe(200);
    await expect.poll(async () => (await server.mail()).some((m) => m.to.includes(A.admin.email)), { timeout: 10_000 }).toBe(true);
    const reset = (await server.mail()).find((m) => m.to.includes(A.admin.email))!;
    expect(reset.school).toBeNull();

    const outboxB = await look("adminB", await clients.adminB.get("/admin/outbox"), "GET /admin/outbox");
    expect(outboxB).not.toContain("/reset/");
    expect(outboxB).toContain(B.teacher.email);
    const outboxA = await (await clients.adminA.get("/admin/outbox")).text();
    expect(outboxA).not.toContain("/reset/");
    expect(outboxA).toContain(A.t1.email);
    expect(outboxA).not.toContain(B.teacher.email);
  });
});

describe("a live room of another school", () => {
  it("seats a signed-in student of school B as a guest: the typed nickname, no link to the account", async () => {
    // The pad page's own data (not the signed-in user's menu): the account name only in their own school's room.
    const padData = async (client: Client) => (await client.get(`/play/${ids.openCode}.data?_routes=routes/live/play`)).text();
    expect(await padData(clients.studentB)).not.toContain(B.student.name);
    expect(await padData(clients.sIn)).toContain(A.sIn.name);
    const pad = await ScriptedSocket.open(server.url, server.url, { Cookie: clients.studentB.cookieHeader() });
    pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: ids.openCode });
    await pad.next("welcome");
    pad.send({ type: "join", room: ids.openCode, nickname: "Visiting Wren" });
    await pad.next("welcome", (m) => m.you !== null);
    pad.ws.close();
    await expect
      .poll(async () => db().select({ nickname: schema.roomPlayers.nickname, userId: schema.roomPlayers.userId }).from(schema.roomPlayers).where(eq(schema.roomPlayers.roomId, ids.openRoom)), { timeout: 5_000 })
      .toEqual([{ nickname: "Visiting Wren", userId: null }]);
    // School A's own student, in the round played earlier, was linked to their account.
    const [played] = await db().select({ nickname: schema.roomPlayers.nickname, userId: schema.roomPlayers.userId }).from(schema.roomPlayers).where(eq(schema.roomPlayers.roomId, ids.playedRoom));
    expect(played).toEqual({ nickname: A.sIn.name, userId: ids.sIn });
  });
});

describe("what school B and strangers were shown", () => {
  it("holds none of school A's names, e-mails or titles", () => {
    expect(foreignBodies.length).toBeGreaterThan(100);
    const leaks = foreignBodies.flatMap(({ role, what, body }) => MARKERS.filter((m) => body.includes(m)).map((m) => `${role} ${what}: ${m}`));
    expect(leaks).toEqual([]);
  });
});
