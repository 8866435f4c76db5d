// Practice answers played on a guitar: the server re-checks the heard (sounding) note against the written one,
// stores how each answer was given, and an assignment that asks for played answers counts only those.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "~/auth/password.server";
import { assignments, memberships, practiceAnswers, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { defaultSpotMap } from "~/music/positions";
import { resolveTuning } from "~/music/tuning";
import { saveClassSpotMap } from "~/reading/spotMaps.server";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

const PLAYER = { id: "played-test-student", email: "ode.played@larkspur.example" }; // Tuesday Beginners
const CONCERT = { id: "played-concert-student", email: "ivo.concert@larkspur.example" }; // Saturday: concert-pitch map

let server: TestServer;
let player: Client;
let concert: Client;
let rafe: Client;

async function signIn(email: string) {
  const client = new Client(server.url);
  expect((await client.post("/signin", { email, password: DEMO_PASSWORD })).status).toBe(302);
  return client;
}

beforeAll(async () => {
  server = await startTestServer();
  const { db } = server.services;
  await seedDemo(db);
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await db.insert(users).values([
    { id: PLAYER.id, orgId: DEMO_SCHOOL.id, role: "student", displayName: "Ode P.", email: PLAYER.email, passwordHash },
    { id: CONCERT.id, orgId: DEMO_SCHOOL.id, role: "student", displayName: "Ivo C.", email: CONCERT.email, passwordHash },
  ]);
  await db.insert(memberships).values([
    { classId: "demo-class-tue", userId: PLAYER.id, role: "student" },
    { classId: "demo-class-sat", userId: CONCERT.id, role: "student" },
  ]);
  const concertMap = defaultSpotMap(5, resolveTuning("standard"), { frets: 15, reading: "concert" });
  expect(await saveClassSpotMap(db, "demo-class-sat", concertMap, "demo-teacher-saoirse")).toEqual([]);
  [player, concert, rafe] = await Promise.all([signIn(PLAYER.email), signIn(CONCERT.email), signIn(DEMO_SCHOOL.teachers[0].email)]);
});
afterAll(() => server.close());

let ids = 0;
const played = (written: string, heardMidi: number, over: Record<string, unknown> = {}) => ({
  clientId: `played-${++ids}-${Math.random().toString(36).slice(2, 8)}`,
  source: "preset:ready-g-major-5",
  position: 5,
  tuning: "standard",
  keyFifths: 1,
  written,
  input: "played",
  heardMidi,
  heardCents: -7,
  reactionMs: 1800,
  at: Date.now() - 60_000,
  ...over,
});
const send = (client: Client, answers: unknown[]) =>
  client.request("/api/v1/practice/answers", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify({ answers }) });
const rowsOf = async (userId: string) => server.services.db.select().from(practiceAnswers).where(eq(practiceAnswers.userId, userId));

describe("the server's re-check of a played note", () => {
  // Ground truth by hand, not by the code under test: MIDI 1.0 numbers (C4 = 60, one number per half step);
  // guitar sounds an octave below written (common practice, no source), so written C5 (72) sounds as 60.
  const GUITAR: [written: string, heard: number, kind: string][] = [
    ["C5", 60, "home-spot"], // right pitch: the only kind the spot-blind microphone can give full credit
    ["C5", 72, "octave-off"], // as written, not an octave down
    ["C5", 48, "octave-off"],
    ["C5", 61, "half-step-off"],
    ["C5", 59, "half-step-off"],
    ["C5", 64, "wide-miss"], // E4: four half steps above
    ["F#5", 65, "key-signature-miss"], // F♯5 = 78 → sounds 66; F natural = 65, in G major (one sharp)
    ["A4", 57, "home-spot"], // A4 = 69 → 57 (A3, 220 Hz by ISO 16)
  ];

  it.each(GUITAR)("written %s heard as MIDI %i → %s", async (written, heardMidi, kind) => {
    const answer = played(written, heardMidi);
    const res = await send(player, [answer]);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.results[0]).toMatchObject({ kind, pitchRight: kind === "home-spot" });
    const [row] = (await rowsOf(PLAYER.id)).filter((r) => r.clientId === answer.clientId);
    expect(row).toMatchObject({ input: "played", heardMidi, heardCents: -7, string: null, fret: null, kind });
  });

  it("reads a class's concert-pitch map as sounding what is written", async () => {
    // Concert pitch: written C5 (72) sounds C5 (72).
    const body = await (await send(concert, [played("C5", 72, { keyFifths: 0, source: "preset:ready-naturals-5", classId: "demo-class-sat" }), played("C5", 60, { keyFifths: 0, source: "preset:ready-naturals-5", classId: "demo-class-sat" })])).json();
    expect(body.results.map((r: { kind: string }) => r.kind)).toEqual(["home-spot", "octave-off"]);
  });

  it("tells the student that a microphone cannot tell the string", async () => {
    const body = await (await send(player, [played("C5", 60)])).json();
    expect(body.results[0].message).toMatch(/cannot tell the string/);
  });

  it("refuses a played answer without a heard note, or with a spot, and stores nothing of the batch", async () => {
    const before = (await rowsOf(PLAYER.id)).length;
    const res = await send(player, [played("C5", 60), played("C5", 60, { heardMidi: undefined }), played("C5", 60, { string: 3, fret: 5 }), played("C5", 130)]);
    expect(res.status).toBe(400);
    const body = await res.json();
    const messages = body.problems.map((p: { message: string }) => p.message).join(" | ");
    expect(messages).toContain("needs the heard note");
    expect(messages).toContain("cannot tell the string");
    expect(messages).toContain("0 to 127");
    expect((await rowsOf(PLAYER.id)).length).toBe(before);
  });

  it("keeps older clients working: an answer without an input is a tap, and a tap needs its spot", async () => {
    const tap = { ...played("C5", 0), input: undefined, heardMidi: undefined, heardCents: undefined, string: 3, fret: 5 };
    const body = await (await send(player, [tap])).json();
    expect(body.results[0].kind).toBe("home-spot");
    const [row] = (await rowsOf(PLAYER.id)).filter((r) => r.clientId === tap.clientId);
    expect(row).toMatchObject({ input: "tap", string: 3, fret: 5, heardMidi: null });
    const noSpot = await send(player, [{ ...tap, clientId: "played-no-spot-1", string: undefined }]);
    expect(noSpot.status).toBe(400);
    expect((await noSpot.json()).error).toContain("needs the string");
  });

  it("lists how each answer was given to the student's teacher", async () => {
    const res = await rafe.get(`/api/v1/practice/answers?student=${PLAYER.id}`);
    expect(res.status).toBe(200);
    const { answers } = await res.json();
    expect(answers.some((a: { input: string; heardMidi: number | null }) => a.input === "played" && a.heardMidi === 60)).toBe(true);
    expect(answers.some((a: { input: string }) => a.input === "tap")).toBe(true);
  });
});

describe("an assignment that asks for played answers", () => {
  it("counts only played answers toward its goal", async () => {
    const { db } = server.services;
    await db.insert(assignments).values({
      id: "played-only-assignment",
      orgId: DEMO_SCHOOL.id,
      classId: "demo-class-tue",
      title: "Play the naturals",
      presetId: "ready-naturals-5",
      goalNotes: 5,
      goalAccuracy: 80,
      dueAt: new Date(Date.now() + 7 * 86_400_000),
      playedOnly: true,
    });
    const base = { source: "preset:ready-naturals-5", keyFifths: 0, assignmentId: "played-only-assignment" };
    const taps = Array.from({ length: 6 }, () => ({ ...played("C5", 0, base), input: "tap", heardMidi: undefined, heardCents: undefined, string: 3, fret: 5 }));
    expect((await send(player, taps)).status).toBe(200);
    const progressOf = async () => {
      const { assignments: mine } = await (await player.get("/api/v1/me/assignments")).json();
      return mine.find((a: { id: string }) => a.id === "played-only-assignment");
    };
    expect((await progressOf()).progress).toMatchObject({ answered: 0, completedAt: null });
    expect((await progressOf()).goal.playedOnly).toBe(true);
    expect((await send(player, Array.from({ length: 5 }, () => played("C5", 60, base)))).status).toBe(200);
    const after = await progressOf();
    expect(after.progress).toMatchObject({ answered: 5, correct: 5 });
    expect(after.status).toBe("done");
  });
});
