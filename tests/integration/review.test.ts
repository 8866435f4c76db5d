import Papa from "papaparse";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken } from "~/auth/tokens.server";
import { answers, classes, memberships, roomPlayers, rooms } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { seedDemo } from "../../server/seed";
import { Client, readUntil, startTestServer, type TestServer } from "./harness";
import { openTestRoom } from "../../server/scripted-rooms";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const signIn = async (email: string) => {
  const client = new Client(server.url);
  expect((await client.post("/signin", { email, password: DEMO_PASSWORD })).status).toBe(302);
  return client;
};

// Rafe teaches Tuesday and Thursday; Saoirse teaches Saturday; Amani is a Tuesday student.
const roles = {
  anonymous: undefined,
  student: DEMO_SCHOOL.studentWithSignIn.email,
  rafe: DEMO_SCHOOL.teachers[0].email,
  saoirse: DEMO_SCHOOL.teachers[1].email,
  admin: DEMO_SCHOOL.admin.email,
} as const;
type Who = keyof typeof roles;
const clients: Partial<Record<Who, Client>> = {};
beforeAll(async () => {
  for (const [who, email] of Object.entries(roles) as [Who, string | undefined][]) clients[who] = email ? await signIn(email) : new Client(server.url);
});

describe("class review: route × role → status", () => {
  // 302 = sent to sign in; 403 = wrong role, or a class of the school you don't teach; 404 = no such thing in your school.
  const page = { anonymous: 302, student: 403, rafe: 200, saoirse: 403, admin: 200 };
  const api = { ...page, anonymous: 401 };
  const table: [string, Record<Who, number>][] = [
    ["/teach/classes/demo-class-tue/review", page],
    ["/teach/classes/demo-class-tue/review?round=demo-round-tue-2", page],
    ["/teach/classes/demo-class-tue/students/demo-student-1", page],
    ["/teach/classes/demo-class-tue/export.csv", page],
    ["/teach/classes/demo-class-tue/export.csv?round=demo-round-tue-1", page],
    ["/api/v1/classes/demo-class-tue/results", api],
    ["/api/v1/rounds/demo-round-tue-1/results", api],
    ["/teach/classes/demo-class-sat/review", { ...page, rafe: 403, saoirse: 200 }],
    ["/api/v1/rounds/demo-round-sat-1/results", { ...api, rafe: 403, saoirse: 200 }],
    // Wrong pairings are 404s, not other classes' data.
    ["/teach/classes/demo-class-tue/review?round=demo-round-sat-1", { ...page, rafe: 404, admin: 404 }],
    ["/teach/classes/demo-class-tue/students/demo-student-17", { ...page, rafe: 404, admin: 404 }],
    ["/teach/classes/no-such-class/review", { ...page, rafe: 404, saoirse: 404, admin: 404 }],
    ["/teach/classes/demo-class-tue/review/live?round=demo-round-sat-1", { ...page, rafe: 403, admin: 404 }],
  ];
  for (const [path, expected] of table) {
    for (const who of Object.keys(roles) as Who[]) {
      it(`${path} as ${who} → ${expected[who]}`, async () => {
        const res = await clients[who]!.get(path);
        expect(res.status).toBe(expected[who]);
        await res.body?.cancel();
      });
    }
  }
});

describe("class review pages", () => {
  it("shows leaderboards, notes to reteach, the note heatmap and mistake shares from the demo history", async () => {
    const html = await (await clients.rafe!.get("/teach/classes/demo-class-thu/review")).text();
    for (const words of ["Leaderboards", "Longest streak", "Most improved since the previous round", "Notes to reteach", "Note heatmap", "What the answers were"]) expect(html).toContain(words);
    // Thursday reads in G major and two students keep missing the F♯.
    expect(html).toMatch(/F♯\d[\s\S]{0,400}not read yet/);
  });

  it("shows a student's progress and personal bests", async () => {
    const html = await (await clients.rafe!.get("/teach/classes/demo-class-tue/students/demo-student-2")).text();
    expect(html).toContain("Personal bests");
    expect(html).toContain("Accuracy per round");
  });
});

describe("the rounds table, paged on the server", () => {
  const classId = "paging-class";
  beforeAll(async () => {
    const { db } = server.services;
    await db.insert(classes).values({ id: classId, orgId: DEMO_SCHOOL.id, name: "Many Rounds", joinCode: "PAGE-3479" });
    await db.insert(memberships).values({ classId, userId: DEMO_SCHOOL.teachers[0].id, role: "teacher" });
    for (let i = 1; i <= 12; i++) {
      const room = await openTestRoom(db, { prompts: 1 });
      const title = `Drill ${String(i).padStart(2, "0")}`;
      await db.update(rooms).set({ classId, title, endedAt: new Date(), createdAt: new Date(Date.UTC(2026, 0, i)) }).where(eq(rooms.id, room.id));
    }
  });

  /** The titles in the rounds table (the round picker above it lists every round). */
  const titles = async (query: string) => {
    const html = await (await clients.rafe!.get(`/teach/classes/${classId}/review${query}`)).text();
    // The table whose own caption names it (its scrolling region's label sits just before it).
    const table = html.split("<table").find((t) => t.split("</caption>")[0]!.includes("Rounds of this class"))!.split("</table>")[0]!;
    return { titles: [...table.matchAll(/review\?round=[^"]*"[^>]*>(Drill \d\d)</g)].map((m) => m[1]), html };
  };

  it("shows the newest page first and moves by plain links", async () => {
    const first = await titles("");
    expect(first.titles).toEqual(["Drill 12", "Drill 11", "Drill 10", "Drill 09", "Drill 08", "Drill 07", "Drill 06", "Drill 05", "Drill 04", "Drill 03"]);
    expect(first.html).toContain("Rows 1–10 of 12");
    expect(first.html).toContain(`href="/teach/classes/${classId}/review?page=2"`);
    expect(first.html).toContain(`href="/teach/classes/${classId}/review?sort=title&amp;dir=asc"`);
    const second = await titles("?page=2");
    expect(second.titles).toEqual(["Drill 02", "Drill 01"]);
    expect(second.html).toContain("Rows 11–12 of 12");
  });

  it("sorts, sizes and filters in SQL", async () => {
    expect((await titles("?sort=title&dir=asc&size=5")).titles).toEqual(["Drill 01", "Drill 02", "Drill 03", "Drill 04", "Drill 05"]);
    const filtered = await titles("?q=drill%201&sort=title&dir=desc");
    expect(filtered.titles).toEqual(["Drill 12", "Drill 11", "Drill 10"]);
    expect((await titles("?q=50%25")).titles).toEqual([]);
    // A page past the end shows the last page; a bad parameter falls back to the default.
    expect((await titles("?page=9&size=10")).titles).toEqual(["Drill 02", "Drill 01"]);
    expect((await titles("?sort=secret&size=7")).titles).toHaveLength(10);
  });
});

describe("JSON API", () => {
  it("lists a class's rounds with summaries, with a session cookie or a Bearer token", async () => {
    const body = await (await clients.rafe!.get("/api/v1/classes/demo-class-tue/results")).json();
    expect(body.class).toEqual({ id: "demo-class-tue", name: "Tuesday Beginners" });
    expect(body.rounds).toHaveLength(5);
    expect(body.rounds[0].players[0]).toMatchObject({ userId: expect.stringMatching(/^demo-student-/), points: expect.any(Number), accuracy: expect.any(Number), longestStreak: expect.any(Number) });
    const { token } = await createApiToken(server.services.db, DEMO_SCHOOL.teachers[0].id, "gradebook");
    const viaToken = await fetch(new URL("/api/v1/rounds/demo-round-tue-1/results", server.url), { headers: { Authorization: `Bearer ${token}` } });
    expect(viaToken.status).toBe(200);
    const round = await viaToken.json();
    expect(round).toMatchObject({ id: "demo-round-tue-1", classId: "demo-class-tue", mode: "sprint" });
    expect(round.notes.length).toBeGreaterThan(3);
    const wrong = await fetch(new URL("/api/v1/rounds/demo-round-tue-1/results", server.url), { headers: { Authorization: "Bearer not-a-token" } });
    expect(wrong.status).toBe(401);
  });
});

describe("CSV export", () => {
  it("downloads one row per student per round, with formula-like names neutralised", async () => {
    const { db } = server.services;
    const room = await openTestRoom(db);
    await db.update(rooms).set({ classId: "demo-class-tue", endedAt: new Date() }).where(eq(rooms.id, room.id));
    await db.insert(roomPlayers).values({ id: `${room.id}-evil`, roomId: room.id, nickname: "=HYPERLINK(\"http://evil.example\")", userId: null });
    const note = room.config.prompts[0]!;
    await db.insert(answers).values({ roomId: room.id, playerId: `${room.id}-evil`, promptIndex: 0, written: note.written, writtenMidi: note.writtenMidi, string: note.home.string, fret: note.home.fret, kind: "home-spot", pitchRight: true, verdict: "right", points: 900, reactionMs: 1200, streak: 1, at: Date.now() });

    const res = await clients.rafe!.get(`/teach/classes/demo-class-tue/export.csv?round=${room.id}`);
    expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(res.headers.get("content-disposition")).toMatch(/attachment; filename="fretcall-Tuesday-Beginners-\d{4}-\d{2}-\d{2}\.csv"/);
    const rows = Papa.parse<string[]>(await res.text(), { skipEmptyLines: true }).data;
    expect(rows[0]).toEqual(["class", "round", "date", "student", "account", "points", "answers", "correct", "accuracy %", "median time s", "longest streak"]);
    expect(rows[1]).toEqual(["Tuesday Beginners", "Test round", expect.any(String), "'=HYPERLINK(\"http://evil.example\")", "nickname only", "900", "1", "1", "100", "1.2", "1"]);

    const all = Papa.parse<string[]>(await (await clients.rafe!.get("/teach/classes/demo-class-tue/export.csv")).text(), { skipEmptyLines: true }).data;
    const played = await db.select().from(roomPlayers).innerJoin(rooms, eq(rooms.id, roomPlayers.roomId)).where(eq(rooms.classId, "demo-class-tue"));
    expect(all.length - 1).toBe(played.length);
  });
});

describe("live review", () => {
  it("sends the answer count, again after a new answer row, and 'ended' when the round ends", async () => {
    const { db } = server.services;
    const room = await openTestRoom(db);
    await db.update(rooms).set({ classId: "demo-class-tue" }).where(eq(rooms.id, room.id));
    const res = await clients.rafe!.get(`/teach/classes/demo-class-tue/review/live?round=${room.id}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/event-stream/);
    const body = res.body!;
    expect(await readUntil(body, /data: 0\n\n/)).toContain("event: answers\ndata: 0\n\n");

    await db.insert(roomPlayers).values({ id: `${room.id}-p`, roomId: room.id, nickname: "Pia", userId: null });
    const note = room.config.prompts[0]!;
    await db.insert(answers).values({ roomId: room.id, playerId: `${room.id}-p`, promptIndex: 0, written: note.written, writtenMidi: note.writtenMidi, string: note.home.string, fret: note.home.fret, kind: "home-spot", pitchRight: true, verdict: "right", points: 900, reactionMs: 1000, streak: 1, at: Date.now() });
    expect(await readUntil(body, /data: 1\n\n/)).toContain("event: answers\ndata: 1\n\n");

    await db.update(rooms).set({ endedAt: new Date() }).where(eq(rooms.id, room.id));
    expect(await readUntil(body, /event: ended\ndata: \w+\n\n/)).toContain("event: ended\ndata: ended\n\n");
  });
});
