import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { answers, roomPlayers, rooms } from "~/db/schema";
import { CLOSE_CODES, MAX_MESSAGE_BYTES, PROTOCOL_VERSION, RATE_LIMIT_BURST, type HostAction, type ServerMessage, type ServerMessageOf } from "~/game/protocol";
import { hostKeyFor } from "~/rooms/rooms.server";
import { seedDemo } from "../../server/seed";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { Client, startTestServer, type TestServer } from "./harness";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket, spotOf, untilShown } from "../../server/scripted-rooms";

let server: TestServer;
let secret: string;
beforeAll(async () => {
  server = await startTestServer();
  secret = server.services.env.SESSION_SECRET;
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

describe("a full Sprint round with 30 scripted players", () => {
  it("plays every prompt, scores on the server and stores every answer", async () => {
    const { db } = server.services;
    const room = await openTestRoom(db, { prompts: 4 });
    const stage = await openStage(server.url, secret, room);
    const players = await Promise.all(Array.from({ length: 30 }, (_, i) => joinPlayer(server.url, room.code, `Player ${i + 1}`)));
    await stage.next("roster", (m) => m.players.length === 30);
    stage.send({ type: "host", action: "start" });

    for (let index = 0; index < room.config.prompts.length; index++) {
      const note = room.config.prompts[index]!;
      const prompt = await stage.next("prompt", (m) => m.index === index);
      await untilShown(prompt.showAt);
      // Even-numbered players tap the home spot; odd ones tap fret 0 of string 1 (wrong unless it happens to be right).
      await Promise.all(
        players.map(async ({ pad }, i) => {
          await pad.next("prompt", (m) => m.index === index);
          pad.send({ type: "answer", promptId: prompt.promptId, spot: i % 2 === 0 ? spotOf(note.home) : { string: 6, fret: 15 }, tapAt: Date.now() });
          const ack = await pad.next("answer-ack", (m) => m.promptId === prompt.promptId);
          expect(ack.accepted).toBe(true);
        }),
      );
      const reveal = await stage.next("reveal", (m) => m.promptId === prompt.promptId);
      expect(reveal.answered).toBe(30);
      expect(reveal.home).toEqual(spotOf(note.home));
      stage.send({ type: "host", action: "next" });
      if (index > 0 && (index + 1) % room.config.standingsEvery === 0 && index + 1 < room.config.prompts.length) {
        await stage.next("standings", (m) => !m.final);
        stage.send({ type: "host", action: "next" });
      }
    }
    const ended = await stage.next("ended");
    expect(ended.summaries).toHaveLength(30);
    const stored = await db.select().from(answers).where(eq(answers.roomId, room.id));
    expect(stored).toHaveLength(30 * room.config.prompts.length);
    for (const s of ended.summaries) {
      const mine = stored.filter((a) => a.playerId === s.playerId);
      expect(mine.reduce((sum, a) => sum + a.points, 0)).toBe(s.points);
    }
    // Home-spot tappers got every prompt, with streak bonuses: more than the others.
    const even = ended.summaries.filter((s) => Number(s.nickname.split(" ")[1]) % 2 === 1);
    expect(Math.min(...even.map((s) => s.correct))).toBe(room.config.prompts.length);
    expect(Math.min(...even.map((s) => s.longestStreak))).toBe(room.config.prompts.length);
    const [row] = await db.select().from(rooms).where(eq(rooms.id, room.id));
    expect(row!.endedAt).not.toBeNull();
    expect((await db.select().from(roomPlayers).where(eq(roomPlayers.roomId, room.id))).length).toBe(30);
    for (const { pad } of players) pad.close();
    stage.close();
  }, 60_000);
});

describe("bad input never crashes or stalls the room", () => {
  it("answers malformed JSON, unknown types and bad fields with an error message", async () => {
    const room = await openTestRoom(server.services.db);
    const s = await ScriptedSocket.open(server.url);
    s.send("{not json");
    expect((await s.next("error")).code).toBe("bad-message");
    s.send({ type: "launch-rockets" });
    expect((await s.next("error", (m) => m.message.includes("launch-rockets"))).code).toBe("bad-message");
    s.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: "!!" });
    await s.next("error", (m) => m.message.startsWith('Bad "hello"'));
    // Still usable afterwards.
    s.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
    expect((await s.next("welcome")).room).toBe(room.code);
    s.close();
  });

  it("closes an oversized message with the documented code", async () => {
    const s = await ScriptedSocket.open(server.url);
    s.send({ type: "join", room: "ABCDEF", nickname: "x".repeat(MAX_MESSAGE_BYTES) });
    expect((await s.waitClose()).code).toBe(CLOSE_CODES.tooLarge);
  });

  it("refuses a wrong protocol version and a forged host key", async () => {
    const room = await openTestRoom(server.services.db);
    const old = await ScriptedSocket.open(server.url);
    old.send({ type: "hello", protocol: PROTOCOL_VERSION + 1, role: "player", room: room.code });
    expect((await old.waitClose()).code).toBe(CLOSE_CODES.badVersion);
    const forger = await ScriptedSocket.open(server.url);
    forger.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: "f".repeat(43) });
    expect((await forger.waitClose()).code).toBe(CLOSE_CODES.unauthorised);
  });

  it("refuses host actions from a pad", async () => {
    const room = await openTestRoom(server.services.db);
    const { pad } = await joinPlayer(server.url, room.code, "Sneaky");
    pad.send({ type: "host", action: "start" });
    expect((await pad.next("error", (m) => m.code === "not-host")).message).toMatch(/stage/);
    pad.close();
  });

  it("rate-limits a flood, then closes the socket", async () => {
    const s = await ScriptedSocket.open(server.url);
    for (let i = 0; i < RATE_LIMIT_BURST + 40; i++) s.send({ type: "ping", t0: i });
    await s.next("error", (m) => m.code === "rate-limited");
    expect((await s.waitClose()).code).toBe(CLOSE_CODES.rateLimited);
  });

  it("refuses a socket from another site", async () => {
    await expect(ScriptedSocket.open(server.url, "http://elsewhere.example")).rejects.toThrow(/403/);
  });

  it("refuses second answers, answers to another prompt and answers after the deadline", async () => {
    const { db } = server.services;
    const room = await openTestRoom(db, { answerMs: 3_000, prompts: 3 });
    const stage = await openStage(server.url, secret, room);
    const a = await joinPlayer(server.url, room.code, "Ada");
    const b = await joinPlayer(server.url, room.code, "Bo");
    stage.send({ type: "host", action: "start" });
    const prompt = await a.pad.next("prompt");
    await untilShown(prompt.showAt);
    a.pad.send({ type: "answer", promptId: "not-this-one", spot: { string: 1, fret: 5 }, tapAt: Date.now() });
    expect((await a.pad.next("answer-ack", (m) => !m.accepted)) as { code: string }).toMatchObject({ code: "wrong-prompt" });
    a.pad.send({ type: "answer", promptId: prompt.promptId, spot: { string: 1, fret: 5 }, tapAt: Date.now() });
    await a.pad.next("answer-ack", (m) => m.accepted);
    const before = a.pad.messages.length;
    a.pad.send({ type: "answer", promptId: prompt.promptId, spot: { string: 2, fret: 5 }, tapAt: Date.now() });
    expect((await a.pad.next("answer-ack", (m) => !m.accepted, before)) as { code: string }).toMatchObject({ code: "already-answered" });
    // Bo waits until after the deadline (and its grace).
    await new Promise((r) => setTimeout(r, prompt.deadline - Date.now() + 400));
    b.pad.send({ type: "answer", promptId: prompt.promptId, spot: { string: 1, fret: 5 }, tapAt: Date.now() });
    const late = await b.pad.next("answer-ack");
    expect(late.accepted).toBe(false);
    const stored = await db.select().from(answers).where(eq(answers.roomId, room.id));
    expect(stored.map((r) => r.playerId)).toEqual([a.you.playerId]);
    for (const s of [stage, a.pad, b.pad]) s.close();
  });
});

describe("reconnecting", () => {
  it("a phone that drops rejoins its own seat with its score, and the stage sees it offline meanwhile", async () => {
    const room = await openTestRoom(server.services.db, { prompts: 3 });
    const stage = await openStage(server.url, secret, room);
    const { pad, you } = await joinPlayer(server.url, room.code, "Wren");
    // A second player who hasn't answered keeps the prompt open while Wren is away.
    const other = await joinPlayer(server.url, room.code, "Yara");
    stage.send({ type: "host", action: "start" });
    const prompt = await pad.next("prompt");
    await untilShown(prompt.showAt);
    pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
    const ack = await pad.next("answer-ack");
    pad.close();
    await stage.next("roster", (m) => m.players.some((p) => p.playerId === you.playerId && !p.online));
    const again = await ScriptedSocket.open(server.url);
    again.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code, seatToken: you.seatToken });
    const welcome = await again.next("welcome", (m) => m.you !== null);
    expect(welcome.you!.playerId).toBe(you.playerId);
    const restored = await again.next("answer-ack");
    expect(restored).toMatchObject({ accepted: true, total: (ack as { total: number }).total });
    await stage.next("roster", (m) => m.players.some((p) => p.playerId === you.playerId && p.online));
    again.close();
    other.pad.close();
    stage.close();
  });
});

describe("a reloaded stage", () => {
  it("gets the phase and the screen it had, in every phase", async () => {
    const room = await openTestRoom(server.services.db, { prompts: 2, countdownMs: 3_000, standingsEvery: 1 });
    const stage = await openStage(server.url, secret, room);
    const { pad } = await joinPlayer(server.url, room.code, "Zia");
    /** A second stage, as after a reload: its snapshot, up to the message that ends it. */
    const reload = async (last: ServerMessage["type"]) => {
      const again = await ScriptedSocket.open(server.url);
      again.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: hostKeyFor(secret, room.id) });
      await again.next(last);
      again.close();
      return again.messages;
    };
    const phases = (messages: ServerMessage[]) => messages.flatMap((m) => ("phase" in m ? [`${m.type}:${m.phase}`] : []));
    const act = async (action: HostAction, type: ServerMessage["type"]) => {
      const from = stage.messages.length;
      stage.send({ type: "host", action });
      return stage.next(type, () => true, from);
    };

    expect(phases(await reload("roster"))).toEqual(["welcome:lobby"]);
    const prompt = (await act("start", "prompt")) as ServerMessageOf<"prompt">;
    // The countdown: the prompt comes back with its note still to show.
    const counting = await reload("answered");
    expect(phases(counting)).toEqual(["welcome:prompt", "prompt:prompt"]);
    expect(counting.find((m) => m.type === "prompt")).toMatchObject({ promptId: prompt.promptId, showAt: prompt.showAt });
    expect((counting[0] as ServerMessageOf<"welcome">).serverTime).toBeLessThan(prompt.showAt);
    // The stage has the note in the countdown, to draw it off-screen and show it at showAt.
    expect(counting.find((m) => m.type === "note")).toMatchObject({ promptId: prompt.promptId, written: room.config.prompts[0]!.written });
    await untilShown(prompt.showAt);
    expect(phases(await reload("answered"))).toEqual(["welcome:prompt", "prompt:prompt"]);
    // Paused mid-prompt: the reloaded stage gets the note (hidden under the pause) and the pause; resumed, a new countdown.
    await act("pause", "paused");
    const held = await reload("paused");
    expect(phases(held)).toEqual(["welcome:paused", "prompt:paused", "paused:paused"]);
    expect(held.map((m) => m.type)).toEqual(["welcome", "roster", "prompt", "note", "answered", "paused"]);
    const resumed = (await act("resume", "prompt")) as ServerMessageOf<"prompt">;
    expect(resumed.showAt).toBeGreaterThan(prompt.showAt);
    await untilShown(resumed.showAt);
    pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(room.config.prompts[0]!.home), tapAt: Date.now() });
    await stage.next("reveal");
    const revealed = await reload("reveal");
    expect(phases(revealed)).toEqual(["welcome:reveal", "prompt:reveal", "reveal:reveal"]);
    expect(revealed.find((m) => m.type === "answered")).toMatchObject({ count: 1, of: 1 });
    await act("pause", "paused");
    expect(phases(await reload("paused"))).toEqual(["welcome:paused", "prompt:paused", "reveal:paused", "paused:paused"]);
    expect((await reload("paused")).at(-1)).toMatchObject({ pausedFrom: "reveal" });
    expect(await act("resume", "resumed")).toMatchObject({ phase: "reveal" });
    await act("next", "standings");
    expect(phases(await reload("standings"))).toEqual(["welcome:standings", "standings:standings"]);
    await act("end", "ended");
    // An ended room is no longer live: the stage page draws its last screen from the log.
    expect((await reload("error")).at(-1)).toMatchObject({ code: "room-ended" });
    const teacher = new Client(server.url);
    expect((await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD })).status).toBe(302);
    const page = await (await teacher.get(`/stage/${room.id}`)).text();
    expect(page).toContain("Round complete");
    expect(page).toContain("Final standings");
    expect(page).toContain("Zia");
    pad.close();
    stage.close();
  });
});

describe("a client that is not a browser", () => {
  it("signs in, opens a room, gets its host credential as JSON and runs the stage (docs/protocol.md)", async () => {
    const teacher = new Client(server.url);
    expect((await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD })).status).toBe(302);
    const opened = await teacher.post("/host", { intent: "set", set: "ready-naturals-5" });
    expect(opened.status).toBe(302);
    const roomId = opened.headers.get("location")!.match(/^\/stage\/([^/?]+)$/)![1]!;
    const res = await teacher.get(`/api/v1/rounds/${roomId}/stage`);
    expect(res.headers.get("cache-control")).toBe("private, no-store");
    const stageInfo = (await res.json()) as { id: string; code: string; hostKey: string; ended: boolean };
    expect(stageInfo).toMatchObject({ id: roomId, ended: false, hostKey: hostKeyFor(secret, roomId) });
    const stage = await ScriptedSocket.open(server.url);
    stage.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: stageInfo.code, hostKey: stageInfo.hostKey });
    expect(await stage.next("welcome")).toMatchObject({ role: "host", phase: "lobby", you: null });
    const { pad } = await joinPlayer(server.url, stageInfo.code, "Rio");
    expect((await stage.next("roster", (m) => m.players.length === 1)).players[0]).toMatchObject({ nickname: "Rio", online: true });
    pad.close();
    stage.close();
    // Without a sign-in there is no credential to be had.
    expect((await new Client(server.url).get(`/api/v1/rounds/${roomId}/stage`)).status).toBe(401);
  });
});
