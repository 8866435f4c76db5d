import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { rooms } from "~/db/schema";
import { CLOSE_CODES, PROTOCOL_VERSION } from "~/game/protocol";
import { NATURALS_KEY_CLASH } from "~/reading/spec";
import { seedDemo } from "../../server/seed";
import { openStage, openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";
import { Client, signedIn, startTestServer, type TestServer } from "./harness";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

/** A room its stage has ended. */
async function endedRoom() {
  const room = await openTestRoom(server.services.db);
  const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
  stage.send({ type: "host", action: "end" });
  await stage.next("ended");
  await stage.waitClose();
  return room;
}

/** A well-formed code no room here has had. */
const NEVER = "YYYYYY";

describe("an ended room's code tells the phone the round is over", () => {
  it("on the pad's page and the join form, apart from a code that never was", async () => {
    const room = await endedRoom();
    const phone = new Client(server.url);
    const over = await phone.get(`/play/${room.code}`);
    expect(over.status).toBe(410);
    const html = await over.text();
    expect(html).toContain("Round over");
    expect(html).toContain("This round is over");

    const unknown = await phone.get(`/play/${NEVER}`);
    expect(unknown.status).toBe(404);
    const unknownHtml = await unknown.text();
    expect(unknownHtml).toContain("No open room has that code");
    expect(unknownHtml).not.toContain("round is over");

    expect(await (await phone.post("/join", { code: room.code })).text()).toContain("This round is over");
    expect(await (await phone.post("/join", { code: NEVER })).text()).toContain("No open room has that code");
  });

  it("over the socket: room-ended and its close reason, room-not-found for an unknown code", async () => {
    const room = await endedRoom();
    const ask = async (code: string) => {
      const pad = await ScriptedSocket.open(server.url);
      pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
      const error = await pad.next("error");
      await pad.waitClose();
      return { error, closed: pad.closed! };
    };
    const ended = await ask(room.code);
    expect(ended.error).toMatchObject({ code: "room-ended", message: expect.stringContaining("This round is over") });
    expect(ended.closed).toEqual({ code: CLOSE_CODES.roomGone, reason: "the room has ended" });
    const unknown = await ask(NEVER);
    expect(unknown.error.code).toBe("room-not-found");
    expect(unknown.closed).toEqual({ code: CLOSE_CODES.roomGone, reason: "no such room" });

    // A join straight away (no hello first) is told the same.
    const pad = await ScriptedSocket.open(server.url);
    pad.send({ type: "join", room: room.code, nickname: "Ola" });
    expect((await pad.next("error")).code).toBe("room-ended");
    pad.close();
  });

  it("a class reloading a finished round is never locked out of the next one", async () => {
    const room = await endedRoom();
    const phone = new Client(server.url);
    // More than the 60 failed look-ups an address may make in ten minutes.
    for (let i = 0; i < 65; i++) expect((await phone.get(`/play/${room.code}`)).status).toBe(410);
    const next = await openTestRoom(server.services.db);
    expect((await phone.get(`/play/${next.code}`)).status).toBe(200);
  });
});

describe("rounds have telling titles", () => {
  const QUICK = { mode: "sprint", position: "5", tuning: "standard", frets: "15", accidentals: "key", keyFifths: "2", homeOnly: "on", prompts: "6", seconds: "10", teams: "2" };

  it("class, mode, key and position, on the stage, the dashboard and the class review", async () => {
    const rafe = await signedIn(server.url, "rafe@larkspur.example");
    const res = await rafe.post("/host", { intent: "quick", ...QUICK, classId: "demo-class-tue" });
    expect(res.status).toBe(302);
    const roomId = res.headers.get("location")!.split("/").pop()!;
    const title = "Tuesday Beginners · Sprint · D major · position 5";
    expect((await server.services.db.select().from(rooms).where(eq(rooms.id, roomId)))[0]!.title).toBe(title);
    for (const page of [`/stage/${roomId}`, "/teach", "/teach/classes/demo-class-tue/review"]) {
      expect(await (await rafe.get(page)).text(), page).toContain(title);
    }
  });

  it("a ready-made set hosted for no class is named by the set", async () => {
    const rafe = await signedIn(server.url, "rafe@larkspur.example");
    const res = await rafe.post("/host", { intent: "set", set: "ready-f-major-5", classId: "" });
    const roomId = res.headers.get("location")!.split("/").pop()!;
    expect(await (await rafe.get(`/stage/${roomId}`)).text()).toContain("One flat: F major · Sprint · F major · position 5");
  });
});

describe("contradictory host settings are refused with the reason", () => {
  it("naturals only with a key of two sharps opens no room and says why, beside the key", async () => {
    const rafe = await signedIn(server.url, "rafe@larkspur.example");
    const before = (await server.services.db.select().from(rooms)).length;
    const res = await rafe.post("/host", { intent: "quick", mode: "sprint", position: "5", tuning: "standard", frets: "15", accidentals: "naturals", keyFifths: "2", homeOnly: "on", prompts: "6", seconds: "10", teams: "2", classId: "" });
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain(NATURALS_KEY_CLASH);
    expect(html).toMatch(/id="key-clash" [^>]*class="flex/);
    expect((await server.services.db.select().from(rooms)).length).toBe(before);
  });
});
