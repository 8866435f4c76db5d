import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "~/auth/password.server";
import { memberships, practiceAnswers, rhythmAttempts, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { defaultSpotMap } from "~/music/positions";
import { resolveTuning } from "~/music/tuning";
import { timeline } from "~/practice/rhythm";
import { saveClassSpotMap } from "~/reading/spotMaps.server";
import { builtinTune } from "~/tunes/builtin";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

const AMANI = "demo-student-1"; // Tuesday Beginners, taught by Rafe
const OTHER_STUDENT = { id: "practice-test-student", email: "wren.practice@larkspur.example" }; // Saturday class

let server: TestServer;
let amani: Client;
let other: Client;
let rafe: Client; // teaches Amani's class
let saoirse: Client; // teaches another class only
let admin: Client;
const anon = () => new Client(server.url);

async function signIn(email: string) {
  const client = new Client(server.url);
  const res = await client.post("/signin", { email, password: DEMO_PASSWORD });
  expect(res.status).toBe(302);
  return client;
}

beforeAll(async () => {
  server = await startTestServer();
  const { db } = server.services;
  await seedDemo(db);
  await db.insert(users).values({ id: OTHER_STUDENT.id, orgId: DEMO_SCHOOL.id, role: "student", displayName: "Wren P.", email: OTHER_STUDENT.email, passwordHash: await hashPassword(DEMO_PASSWORD) });
  await db.insert(memberships).values({ classId: "demo-class-sat", userId: OTHER_STUDENT.id, role: "student" });
  [amani, other, rafe, saoirse, admin] = await Promise.all([
    signIn(DEMO_SCHOOL.studentWithSignIn.email),
    signIn(OTHER_STUDENT.email),
    signIn(DEMO_SCHOOL.teachers[0].email),
    signIn(DEMO_SCHOOL.teachers[1].email),
    signIn(DEMO_SCHOOL.admin.email),
  ]);
});
afterAll(() => server.close());

const postJson = (client: Client, path: string, body: unknown) =>
  client.request(path, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
const sendAnswers = (client: Client, answers: unknown[]) => postJson(client, "/api/v1/practice/answers", { answers });

let ids = 0;
/** An answer to C5 in fifth position (home spot: string 3, fret 5), tapped where asked. */
const answer = (over: Record<string, unknown> = {}) => ({
  clientId: `test-answer-${++ids}-${Math.random().toString(36).slice(2, 8)}`,
  source: "preset:ready-naturals-5",
  position: 5,
  tuning: "standard",
  keyFifths: 0,
  written: "C5",
  string: 3,
  fret: 5,
  reactionMs: 1400,
  at: Date.now() - 60_000,
  ...over,
});
const storedFor = async (userId: string) => server.services.db.select().from(practiceAnswers).where(eq(practiceAnswers.userId, userId));
const countFor = async (userId: string) => (await storedFor(userId)).length;

describe("the demo student's practice (seeded)", () => {
  it("shows a day streak, recent sessions and her progress per note on her home", async () => {
    // React marks text boundaries with empty comments; the words are what count.
    const html = (await (await amani.get("/me")).text()).replaceAll("<!-- -->", "");
    // Demo: practice on each of the last six days (app/demo/practice.ts); the assignment demo may add today.
    const days = Number(/<strong[^>]*>(\d+)<\/strong> days in a row/.exec(html)?.[1]);
    expect(days).toBeGreaterThanOrEqual(6);
    expect(html).toContain("Recent practice");
    expect(html).toContain("Your notes in position 5");
    expect(html).toContain("Rhythm pass: Lantern Walk");
  });

  it("opens the rhythm pass of a tune whose pitches she has steadied, and keeps it locked for others", async () => {
    expect(await (await amani.get("/me/rhythm/lantern-walk")).text()).toContain("Start the count-in");
    const locked = await (await other.get("/me/rhythm/lantern-walk")).text();
    expect(locked).toContain("Pitch first");
    expect(locked).not.toContain("Start the count-in");
  });
});

describe("POST /api/v1/practice/answers", () => {
  it("stores answers with the server's own diagnosis, whatever the phone claims", async () => {
    const before = await countFor(AMANI);
    const right = answer();
    // A phone that claims a wrong tap was right: the claim is not even read.
    const wrong = answer({ string: 3, fret: 6, kind: "home-spot", pitchRight: true });
    const res = await sendAnswers(amani, [right, wrong]);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ stored: 2, duplicates: 0 });
    expect(body.results.map((r: { kind: string }) => r.kind)).toEqual(["home-spot", "half-step-off"]);
    const rows = (await storedFor(AMANI)).filter((r) => [right.clientId, wrong.clientId].includes(r.clientId));
    expect(rows.map((r) => [r.kind, r.pitchRight, r.writtenMidi])).toEqual(
      expect.arrayContaining([
        ["home-spot", true, 72],
        ["half-step-off", false, 72],
      ]),
    );
    expect(await countFor(AMANI)).toBe(before + 2);
  });

  it("is idempotent: a resend after a dropped connection stores nothing twice", async () => {
    const batch = [answer(), answer({ written: "D5", string: 3, fret: 7 })];
    expect((await (await sendAnswers(amani, batch)).json()).stored).toBe(2);
    const count = await countFor(AMANI);
    const again = await (await sendAnswers(amani, batch)).json();
    expect(again).toMatchObject({ stored: 0, duplicates: 2 });
    expect(again.results.every((r: { duplicate: boolean }) => r.duplicate)).toBe(true);
    expect(await countFor(AMANI)).toBe(count);
  });

  it("uses the class's own home-spot map when the answer names the class", async () => {
    // Tuesday Beginners play E5 (sounding E4) on string 3, fret 9 instead of the default string 2, fret 5.
    const tuning = resolveTuning("standard");
    const map = defaultSpotMap(5, tuning);
    map.spots = map.spots.map((s) => (s.written === "E5" ? { ...s, string: 3, fret: 9 } : s));
    expect(await saveClassSpotMap(server.services.db, "demo-class-tue", map, "demo-teacher-rafe")).toEqual([]);
    const onClassMap = answer({ written: "E5", string: 3, fret: 9, classId: "demo-class-tue" });
    const onDefault = answer({ written: "E5", string: 2, fret: 5, classId: "demo-class-tue" });
    const withoutClass = answer({ written: "E5", string: 2, fret: 5 });
    const body = await (await sendAnswers(amani, [onClassMap, onDefault, withoutClass])).json();
    expect(body.results.map((r: { kind: string }) => r.kind)).toEqual(["home-spot", "other-spot", "home-spot"]);
  });

  it("counts answers toward one of her assignments, and refuses an assignment or class that is not hers", async () => {
    const ok = await sendAnswers(amani, [answer({ assignmentId: "demo-assignment-tue", classId: "demo-class-tue" })]);
    expect(ok.status).toBe(200);
    const theirs = await sendAnswers(amani, [answer({ assignmentId: "demo-assignment-sat" })]);
    expect(theirs.status).toBe(400);
    expect((await theirs.json()).error).toContain("that assignment is not one of yours");
    const notMyClass = await sendAnswers(amani, [answer({ classId: "demo-class-sat" })]);
    expect((await notMyClass.json()).error).toContain("you are not in that class");
  });

  it("credits practice of an assignment's material to it however it was started, by one rule, and the page names it", async () => {
    const stored = async (clientId: string) =>
      (await server.services.db.select({ assignmentId: practiceAnswers.assignmentId }).from(practiceAnswers).where(eq(practiceAnswers.clientId, clientId)))[0]?.assignmentId;
    // The ready-made set of her open assignment, started from her list (no assignment id sent): it counts.
    const fromList = answer({ classId: "demo-class-tue" });
    // Material no assignment of hers asks for: it counts toward nothing.
    const other = answer({ source: "preset:ready-g-major-5", keyFifths: 1 });
    expect((await sendAnswers(amani, [fromList, other])).status).toBe(200);
    expect(await stored(fromList.clientId)).toBe("demo-assignment-tue");
    expect(await stored(other.clientId)).toBeNull();
    // The practice page says so, from either path; free practice of other material says nothing.
    const page = async (query: string) => (await (await amani.get(`/me/practice?${query}`)).text()).replace(/<!-- -->/g, "");
    for (const query of ["preset=ready-naturals-5", "assignment=demo-assignment-tue"]) {
      expect(await page(query)).toMatch(/Counts toward your assignment <strong>Naturals in fifth position<\/strong> \(Tuesday Beginners, due/);
    }
    expect(await page("preset=ready-g-major-5")).not.toContain("Counts toward");
  });

  it.each([
    ["a week-old answer", { at: Date.now() - 8 * 86_400_000 }, "more than 7 days ago: too old to count"],
    ["an answer from the future", { at: Date.now() + 60 * 60_000 }, "its time lies in the future"],
    ["an unknown tuning", { tuning: "banjo" }, "banjo"],
    ["a position off the neck", { position: 13 }, "The position must be 1 to 12."],
    ["a fret off the neck", { fret: 30 }, "The fret must be 0 to 24."],
    ["a note that is not a pitch", { written: "H4" }, '"H4" is not a pitch'],
    ["a note out of the position", { written: "C7" }, "C7 has no home spot in position 5."],
    ["a made-up source", { source: "anything" }, "The source is"],
    ["no clientId", { clientId: undefined }, "Every answer needs a clientId."],
  ])("refuses %s with a clear message and stores nothing of the batch", async (_name, bad, message) => {
    const before = await countFor(AMANI);
    const res = await sendAnswers(amani, [answer(), answer(bad)]);
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.error).toMatch(/^Nothing was stored/);
    expect(body.problems).toHaveLength(1);
    expect(body.problems[0]).toMatchObject({ index: 1 });
    expect(body.problems[0].message).toContain(`Answer 2: `);
    expect(body.problems[0].message).toContain(message);
    expect(await countFor(AMANI)).toBe(before);
  });

  it("refuses bodies that are not a batch of answers", async () => {
    const before = await countFor(AMANI);
    const notJson = await amani.request("/api/v1/practice/answers", { method: "POST", headers: { "Content-Type": "application/json" }, body: "{oops" });
    expect(notJson.status).toBe(400);
    expect((await notJson.json()).error).toBe("The body is not valid JSON.");
    const form = await amani.post("/api/v1/practice/answers", { answers: "[]" });
    expect(form.status).toBe(415);
    const empty = await sendAnswers(amani, []);
    expect((await empty.json()).error).toContain("Send at least one answer.");
    const tooMany = await sendAnswers(amani, Array.from({ length: 101 }, () => answer()));
    expect((await tooMany.json()).error).toContain("Send at most 100 answers at a time.");
    const twice = answer();
    expect((await (await sendAnswers(amani, [twice, twice])).json()).error).toContain("repeats a clientId");
    expect(await countFor(AMANI)).toBe(before);
  });
});

describe("practice: route × role → status", () => {
  // 302 = sent to sign in; 400 = a teacher or admin must name the student; 401/403 = refused.
  const table: [string, [anonymous: number, student: number, teacher: number, admin: number]][] = [
    ["/me/practice", [302, 200, 403, 403]],
    ["/me/practice?preset=ready-naturals-5", [302, 200, 403, 403]],
    ["/me/rhythm/lantern-walk", [302, 200, 403, 403]],
    ["/api/v1/practice/answers", [401, 200, 400, 400]],
    [`/api/v1/practice/answers?student=${AMANI}`, [401, 200, 200, 200]],
    ["/api/v1/practice/rhythm", [401, 200, 403, 403]],
  ];
  for (const [path, statuses] of table) {
    it(`GET ${path} → ${statuses.join(" / ")}`, async () => {
      const clients = [anon(), amani, rafe, admin];
      expect(await Promise.all(clients.map(async (c) => (await c.get(path)).status))).toEqual(statuses);
    });
  }
  it.each([["/api/v1/practice/answers"], ["/api/v1/practice/rhythm"]])("POST %s → 401 / 403 for all but students", async (path) => {
    const statuses = await Promise.all([anon(), rafe, admin].map(async (c) => (await postJson(c, path, {})).status));
    expect(statuses).toEqual([401, 403, 403]);
  });
});

describe("who may write and read practice", () => {
  it("only a signed-in student writes their own answers", async () => {
    expect((await sendAnswers(anon(), [answer()])).status).toBe(401);
    for (const client of [rafe, admin]) {
      const res = await sendAnswers(client, [answer()]);
      expect(res.status).toBe(403);
      expect((await res.json()).error).toContain("sent by the student who practised");
    }
    // The answer lands on the sender's own account, never on anyone else's.
    const mine = answer();
    await sendAnswers(other, [mine]);
    expect((await storedFor(OTHER_STUDENT.id)).map((r) => r.clientId)).toContain(mine.clientId);
    expect((await storedFor(AMANI)).map((r) => r.clientId)).not.toContain(mine.clientId);
  });

  it("a student reads their own answers; a teacher of their class and their school's admin may too; nobody else", async () => {
    const own = await amani.get("/api/v1/practice/answers?limit=5");
    expect(own.status).toBe(200);
    expect((await own.json()).answers).toHaveLength(5);
    for (const client of [rafe, admin]) expect((await client.get(`/api/v1/practice/answers?student=${AMANI}`)).status).toBe(200);
    // Another teacher or student of the school: 403 (another school's users get 404: tests/integration/tenancy.test.ts).
    for (const client of [saoirse, other]) {
      const res = await client.get(`/api/v1/practice/answers?student=${AMANI}`);
      expect(res.status).toBe(403);
      expect(await res.json()).toMatchObject({ error: expect.stringContaining("teachers") });
    }
    expect((await anon().get("/api/v1/practice/answers")).status).toBe(401);
    expect((await amani.get("/api/v1/practice/answers?since=yesterday")).status).toBe(400);
  });

  it("the practice pages are the student's own", async () => {
    expect((await rafe.get("/me/practice")).status).toBe(403);
    expect((await rafe.get("/me/rhythm/lantern-walk")).status).toBe(403);
    const signedOut = await anon().get("/me/practice");
    expect(signedOut.status).toBe(302);
    expect(signedOut.headers.get("location")).toContain("/signin");
  });
});

describe("the practice page", () => {
  it("lists what to practise and runs a session from a ready-made set, an assignment, a tune or a position", async () => {
    const list = await (await amani.get("/me/practice")).text();
    expect(list).toContain("Naturals in fifth position");
    expect(list).toContain("Lantern Walk");
    for (const query of ["preset=ready-naturals-5", "assignment=demo-assignment-tue", "tune=harbour-bells", "position=2"]) {
      const res = await amani.get(`/me/practice?${query}`);
      expect(res.status, query).toBe(200);
      expect(await res.text()).toContain("Start practising");
    }
  });

  it("answers a bad choice with a clear message", async () => {
    const noSuch = await amani.get("/me/practice?assignment=nope");
    expect(noSuch.status).toBe(404);
    expect(await noSuch.text()).toContain("No such assignment for you.");
    // Another class's assignment is not hers either.
    expect((await amani.get("/me/practice?assignment=demo-assignment-sat")).status).toBe(404);
    const position = await amani.get("/me/practice?position=99");
    expect(position.status).toBe(400);
    expect(await position.text()).toContain("Position must be a whole number from 1 to 12.");
    expect((await amani.get("/me/rhythm/no-such-tune")).status).toBe(404);
  });
});

describe("POST /api/v1/practice/rhythm", () => {
  const tune = builtinTune("lantern-walk")!;
  const onTheBeat = timeline(tune, 90).onsets.map(Math.round);

  it("scores the taps on the server, stores the pass once, and shows it", async () => {
    const pass = { id: "test-pass-0001", tuneId: "lantern-walk", tempo: 90, taps: onTheBeat, score: 3 };
    const res = await postJson(amani, "/api/v1/practice/rhythm", pass);
    expect(res.status).toBe(200);
    const body = await res.json();
    // Every tap within a millisecond of its onset: all on time, whatever score the phone sent.
    expect(body).toMatchObject({ score: 100, duplicate: false, extraTaps: 0 });
    expect(body.notes.every((n: { grade: string }) => n.grade === "on-time")).toBe(true);
    const again = await (await postJson(amani, "/api/v1/practice/rhythm", { ...pass, taps: [] })).json();
    expect(again).toMatchObject({ duplicate: true, score: 100 });
    const rows = await server.services.db.select().from(rhythmAttempts).where(and(eq(rhythmAttempts.userId, AMANI), eq(rhythmAttempts.id, pass.id)));
    expect(rows).toHaveLength(1);
    expect((await (await amani.get("/api/v1/practice/rhythm?tune=lantern-walk")).json()).passes[0].id).toBe(pass.id);
  });

  it("stores a played pass: the calibrated delay comes off what the microphone heard, and the teacher sees how it was given", async () => {
    // Every note heard 137 ms after its onset, and 137 ms calibrated: 137 − 137 = 0, all on time.
    const pass = { id: "test-pass-played1", tuneId: "lantern-walk", tempo: 90, taps: onTheBeat.map((t) => t + 137), input: "played", latencyMs: 137 };
    const res = await postJson(amani, "/api/v1/practice/rhythm", pass);
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ score: 100, input: "played", latencyMs: 137, duplicate: false });
    const [row] = await server.services.db.select().from(rhythmAttempts).where(eq(rhythmAttempts.id, pass.id));
    expect(row).toMatchObject({ input: "played", score: 100 });
    // Without the calibrated delay the same notes are all 137 ms late: 80 < 137 ≤ 160, close, half credit each.
    const raw = await (await postJson(amani, "/api/v1/practice/rhythm", { ...pass, id: "test-pass-played2", latencyMs: 0 })).json();
    expect(raw).toMatchObject({ score: 50, input: "played" });
    const [tapped] = await server.services.db.select().from(rhythmAttempts).where(eq(rhythmAttempts.id, "test-pass-0001"));
    expect(tapped!.input).toBe("tap");
    const passes = (await (await amani.get("/api/v1/practice/rhythm?tune=lantern-walk")).json()).passes;
    expect(passes.map((p: { input: string }) => p.input)).toEqual(expect.arrayContaining(["played", "tap"]));

    const page = await rafe.get(`/teach/classes/demo-class-tue/students/${AMANI}`);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain("Rhythm passes");
    expect(html).toContain("Played on the guitar");
    expect(html).toContain("Tapped");
  });

  it.each([
    [{ input: "played" }, "A played pass names its calibrated delay (latencyMs)"],
    [{ latencyMs: 100 }, "only a played pass has one"],
    [{ input: "played", latencyMs: 500 }, "The calibrated delay must be -150 to 400 ms."],
    [{ input: "played", latencyMs: 12.5 }, "The calibrated delay must be -150 to 400 ms."],
    [{ input: "sung" }, 'Say how the notes were given: "tap" or "played".'],
  ])("refuses a pass with %j and stores nothing", async (over, error) => {
    const id = `test-pass-bad-${Math.random().toString(36).slice(2, 8)}`;
    const res = await postJson(amani, "/api/v1/practice/rhythm", { id, tuneId: "lantern-walk", tempo: 90, taps: onTheBeat, ...over });
    expect(res.status).toBe(400);
    expect((await res.json()).error).toContain(error);
    expect(await server.services.db.select().from(rhythmAttempts).where(eq(rhythmAttempts.id, id))).toHaveLength(0);
  });

  it("keeps the pass locked until the pitches are steady, and refuses bad passes", async () => {
    const locked = await postJson(other, "/api/v1/practice/rhythm", { id: "test-pass-0002", tuneId: "lantern-walk", tempo: 90, taps: onTheBeat });
    expect(locked.status).toBe(409);
    expect((await locked.json()).error).toContain("Pitch first");
    const tempo = await postJson(amani, "/api/v1/practice/rhythm", { id: "test-pass-0003", tuneId: "lantern-walk", tempo: 300, taps: [] });
    expect(tempo.status).toBe(400);
    expect((await tempo.json()).error).toContain("The tempo must be 40 to 160 beats per minute.");
    expect((await postJson(amani, "/api/v1/practice/rhythm", { id: "test-pass-0004", tuneId: "nope", tempo: 90, taps: [] })).status).toBe(404);
    expect((await postJson(rafe, "/api/v1/practice/rhythm", { id: "test-pass-0005", tuneId: "lantern-walk", tempo: 90, taps: [] })).status).toBe(403);
    // Another student cannot overwrite or read a pass by reusing its id.
    expect((await postJson(other, "/api/v1/practice/rhythm", { id: "test-pass-0001", tuneId: "lantern-walk", tempo: 90, taps: [] })).status).toBe(409);
  });
});
