// Deleting a student deletes them: after an admin deletes a student who played live rounds (one of
// them still open), practised, has a token and mail, no table, export, results page or the database
// file and its WAL holds their name, e-mail or id; the rounds replay, and the open room comes back
// after a restart with the seat anonymised.
import { eq } from "drizzle-orm";
import { existsSync, readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken } from "~/auth/tokens.server";
import { mailLog, practiceAnswers, roomPlayers, rooms } from "~/db/schema";
import { DEMO_SCHOOL } from "~/demo/school";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { loadRoomState } from "~/rooms/log.server";
import { REMOVED_STUDENT } from "~/school/people.server";
import { seedDemo } from "../../server/seed";
import { Client, signedIn, startTestServer, type TestServer } from "./harness";
import { answerFirstPrompt, openStage, openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";

let server: TestServer;
const db = () => server.services.db;
const STUDENT = { id: "demo-student-1", name: "Amani K.", email: DEMO_SCHOOL.studentWithSignIn.email };
const TUE = "demo-class-tue";
// Their id must not match demo-student-10 … 19.
const TRACES = [/Amani/i, new RegExp(STUDENT.email.replace(/\./g, "\\."), "i"), /demo-student-1(?!\d)/];

beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(db());
});
afterAll(() => server.close());

const signIn = (email: string) => signedIn(server.url, email);

/** The student plays one prompt of a room of their class, signed in (so the seat is linked to the account). */
async function playSignedIn(student: Client, end: boolean) {
  const room = await openTestRoom(db(), { prompts: 2 });
  await db().update(rooms).set({ classId: TUE }).where(eq(rooms.id, room.id));
  const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
  const pad = await ScriptedSocket.open(server.url, server.url, { Cookie: student.cookieHeader() });
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
  await pad.next("welcome");
  pad.send({ type: "join", room: room.code, nickname: "ignored" });
  const you = (await pad.next("welcome", (m) => m.you !== null)).you!;
  expect(you.nickname).toBe(STUDENT.name);
  await answerFirstPrompt(stage, pad, room);
  if (end) {
    stage.send({ type: "host", action: "end" });
    await stage.next("ended");
  }
  return { room, stage, pad };
}

/** Every row of every table, as text. */
async function everyRow() {
  const tables = await db().$client.execute("SELECT name FROM sqlite_master WHERE type = 'table'");
  const out: string[] = [];
  for (const { name } of tables.rows) {
    const rows = await db().$client.execute(`SELECT * FROM "${String(name)}"`);
    for (const row of rows.rows) out.push(`${String(name)}: ${JSON.stringify(row)}`);
  }
  return out;
}

const traced = (text: string) => TRACES.filter((t) => t.test(text)).map(String);

describe("deleting a student", () => {
  let ended: Awaited<ReturnType<typeof playSignedIn>>;
  let open: Awaited<ReturnType<typeof playSignedIn>>;
  let tokenName: string;

  beforeAll(async () => {
    const student = await signIn(STUDENT.email);
    ended = await playSignedIn(student, true);
    open = await playSignedIn(student, false);
    tokenName = "gradebook for Amani";
    await createApiToken(db(), STUDENT.id, tokenName);
  });

  it("first, the personal-data export holds everything kept about them (and no secret)", async () => {
    const student = await signIn(STUDENT.email);
    const res = await student.get(`/people/${STUDENT.id}/export.json`);
    expect(res.status).toBe(200);
    const text = await res.text();
    const body = JSON.parse(text) as {
      profile: { displayName: string; email: string };
      classes: unknown[];
      rounds: { roomId: string; nickname: string; answers: unknown[]; events: { event: { event: { type: string; nickname?: string } } }[] }[];
      practiceAnswers: unknown[];
      mailSent: { kind: string }[];
      apiTokens: { name: string }[];
      assignedTo: unknown[];
    };
    expect(body.profile).toMatchObject({ displayName: STUDENT.name, email: STUDENT.email });
    expect(body.classes.length).toBeGreaterThan(0);
    const round = body.rounds.find((r) => r.roomId === ended.room.id)!;
    expect(round.nickname).toBe(STUDENT.name);
    expect(round.answers).toHaveLength(1);
    expect(round.events.map((e) => e.event.event.type)).toEqual(expect.arrayContaining(["join", "answer"]));
    expect(round.events.find((e) => e.event.event.type === "join")!.event.event.nickname).toBe(STUDENT.name);
    expect(body.practiceAnswers.length).toBeGreaterThan(0);
    expect(body.mailSent.length).toBeGreaterThan(0);
    expect(body.apiTokens.map((t) => t.name)).toEqual([tokenName]);
    // Tokens and invitations by name and dates only.
    expect(text).not.toMatch(/hash/i);
    // Seats, practice and mail are really there, so the checks after the deletion can fail.
    expect((await everyRow()).filter((r) => traced(r).length).length).toBeGreaterThan(10);
  });

  it("leaves no trace in any table, page, export or the database file", async () => {
    expect(await db().$count(practiceAnswers, eq(practiceAnswers.userId, STUDENT.id))).toBeGreaterThan(0);
    expect(await db().$count(mailLog, eq(mailLog.userId, STUDENT.id))).toBeGreaterThan(0);
    const admin = await signIn(DEMO_SCHOOL.admin.email);
    const done = await admin.post(`/admin/students/${STUDENT.id}`, { confirmName: STUDENT.name });
    expect(done.status).toBe(302);

    expect((await everyRow()).filter((r) => traced(r).length)).toEqual([]);

    // Their seats stay for the class's figures, anonymised, with their answers.
    const seats = await db().select().from(roomPlayers).where(eq(roomPlayers.roomId, ended.room.id));
    expect(seats).toEqual([expect.objectContaining({ userId: null, nickname: REMOVED_STUDENT })]);
    const replayed = await loadRoomState(db(), ended.room.id);
    expect(replayed!.state.players.map((p) => [p.nickname, p.points > 0])).toEqual([[REMOVED_STUDENT, true]]);
    expect(replayed!.state.answers).toHaveLength(1);

    const teacher = await signIn(DEMO_SCHOOL.teachers[0].email);
    for (const path of [`/results/${ended.room.id}`, `/results/${open.room.id}`, `/teach/classes/${TUE}/review`, `/teach/classes/${TUE}/export.csv`, `/teach/classes/${TUE}`, `/admin`, `/api/v1/rounds/${ended.room.id}/results`]) {
      const who = path === "/admin" ? admin : teacher;
      const res = await who.get(path);
      expect(res.status, path).toBe(200);
      expect(traced(await res.text()), path).toEqual([]);
    }
    expect(await (await teacher.get(`/results/${ended.room.id}`)).text()).toContain(REMOVED_STUDENT);
    expect((await admin.get(`/people/${STUDENT.id}/export.json`)).status).toBe(404);
    // The mail catcher's outbox is a copy of what was sent, kept outside the database.

    // The bytes: the deleted pages were overwritten and the WAL was copied back and emptied. (Not
    // the id: free space in a page may hold the cut-off start of a neighbour's, "demo-student-1…".)
    const file = server.services.env.DATABASE_URL.slice("file:".length);
    for (const path of [file, `${file}-wal`]) {
      if (!existsSync(path)) continue;
      const bytes = readFileSync(path).toString("latin1");
      expect(traced(bytes).filter((t) => !t.includes("demo-student")), path).toEqual([]);
    }
  });

  it("the open room plays on, and after a restart its seat comes back anonymised", async () => {
    open.stage.send({ type: "host", action: "next" });
    await open.stage.next("prompt", (m) => m.index === 1);
    open.pad.close();
    open.stage.close();
    await server.close();
    server = await startTestServer();
    const stage = await openStage(server.url, server.services.env.SESSION_SECRET, open.room);
    const roster = await stage.next("roster");
    expect(roster.players.map((p) => p.nickname)).toEqual([REMOVED_STUDENT]);
    stage.send({ type: "host", action: "end" });
    const standings = await stage.next("standings", (m) => m.final);
    expect(JSON.stringify(standings)).not.toMatch(/Amani/);
    stage.close();
    expect((await everyRow()).filter((r) => traced(r).length)).toEqual([]);
  });
});
