// Names that can't impersonate, end to end: a look-alike nickname is numbered like a taken one,
// hidden characters are refused on the socket and in forms, and nothing is stored then.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { classes, users } from "~/db/schema";
import { DEMO_SCHOOL } from "~/demo/school";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { Client, signedIn, startTestServer, type TestServer } from "./harness";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";

let server: TestServer;
const db = () => server.services.db;

beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(db());
});
afterAll(() => server.close());

const signIn = (email: string) => signedIn(server.url, email);

const html = async (res: Response) => (await res.text()).replace(/&#x27;/g, "'");

describe("in a room", () => {
  it("a nickname that looks like one already there counts as the same name", async () => {
    const room = await openTestRoom(db());
    const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
    const first = await joinPlayer(server.url, room.code, "Ana");
    const second = await joinPlayer(server.url, room.code, "\u0410na"); // Cyrillic А
    const third = await joinPlayer(server.url, room.code, "ANA");
    expect([first.you.nickname, second.you.nickname, third.you.nickname]).toEqual(["Ana", "\u0410na 2", "ANA 3"]);
    const roster = await stage.next("roster", (m) => m.players.length === 3);
    expect(roster.players.map((p) => p.nickname)).toEqual(["Ana", "\u0410na 2", "ANA 3"]);
    for (const s of [stage, first.pad, second.pad, third.pad]) s.close();
  });

  it.each([
    ["Ana\u200B", /invisible characters \(U\+200B\)/],
    ["\u202Eana", /text-direction control characters \(U\+202E\)/],
    ["Z\u0301\u0302\u0303\u0304\u0305ed", /accent marks/],
  ])("refuses the nickname %j with a clear message", async (nickname, message) => {
    const room = await openTestRoom(db());
    const pad = await ScriptedSocket.open(server.url);
    pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
    await pad.next("welcome");
    pad.send({ type: "join", room: room.code, nickname });
    const error = await pad.next("error");
    expect(error.code).toBe("bad-nickname");
    expect(error.message).toMatch(message);
    pad.close();
  });
});

describe("in forms", () => {
  it("a class name with a direction control is refused and not stored", async () => {
    const admin = await signIn(DEMO_SCHOOL.admin.email);
    const page = await html(await admin.post("/admin", { intent: "createClass", name: "Guitar 1\u202E", teacherId: "" }));
    expect(page).toContain("Names can't contain text-direction control characters (U+202E).");
    expect(await db().select().from(classes).where(eq(classes.name, "Guitar 1\u202E"))).toEqual([]);
    // The tidied name is what is stored.
    await admin.post("/admin", { intent: "createClass", name: "  Guitar   2 ", teacherId: "" });
    expect(await db().select({ name: classes.name }).from(classes).where(eq(classes.name, "Guitar 2"))).toHaveLength(1);
  });

  it("a roster name that looks like a student's already in the class is refused", async () => {
    const teacher = await signIn(DEMO_SCHOOL.teachers[0].email);
    const page = await html(await teacher.post("/teach/classes/demo-class-tue", { intent: "add", name: "\u0410mani K.", email: "" }));
    expect(page).toContain("A student with this name is already in the class.");
    const zeroWidth = await html(await teacher.post("/teach/classes/demo-class-tue", { intent: "add", name: "Ola\u200D", email: "" }));
    expect(zeroWidth).toContain("Names can't contain invisible characters (U+200D).");
    expect(await db().select().from(users).where(eq(users.displayName, "\u0410mani K."))).toEqual([]);
  });

  it("a sign-up with a hidden character in the name is refused", async () => {
    const client = new Client(server.url);
    const page = await html(
      await client.post("/signup", { studioName: "Fret\u2060Works", displayName: "Ines", email: "ines@fretworks.example", password: "long-enough-pass", confirm: "long-enough-pass" }),
    );
    expect(page).toContain("Names can't contain invisible characters (U+2060).");
    expect(await db().select().from(users).where(eq(users.email, "ines@fretworks.example"))).toEqual([]);
  });
});
