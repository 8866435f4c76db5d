import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";
import { seedDemo } from "../../server/seed";
import { startTestServer, type TestServer } from "./harness";

let server: TestServer;
let secret: string;
beforeAll(async () => {
  server = await startTestServer();
  secret = server.services.env.SESSION_SECRET;
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

describe("one socket, one seat", () => {
  it("gives a socket alternating hello and join one seat at most", async () => {
    const room = await openTestRoom(server.services.db);
    const stage = await openStage(server.url, secret, room);
    const s = await ScriptedSocket.open(server.url);
    for (let i = 0; i < 6; i++) {
      s.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
      s.send({ type: "join", room: room.code, nickname: `Ghost ${i + 1}` });
    }
    await s.next("error", (m) => m.message.includes("already has a seat"));
    // Every message was handled once the last hello's welcome is in.
    s.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: "x".repeat(43) });
    await s.waitClose();
    // Every join is in the room by now; the roster after a later room event shows them all.
    stage.send({ type: "host", action: "lock" });
    const roster = await stage.next("roster", (m) => m.locked);
    expect(roster.players.map((p) => p.nickname)).toEqual(["Ghost 1"]);
    // Joins 2–5 refused for the seat already held (the 6th meets the per-socket seat limit first).
    expect(s.messages.filter((m) => m.type === "error" && m.message.includes("already has a seat")).length).toBeGreaterThanOrEqual(4);
    stage.close();
  });
});

describe("offline seats", () => {
  it("a full room of offline players who never answered still admits a real student, and the host clears them", async () => {
    const room = await openTestRoom(server.services.db, { maxPlayers: 3 });
    const stage = await openStage(server.url, secret, room);
    const ghosts = await Promise.all(["Ghost A", "Ghost B", "Ghost C"].map((n) => joinPlayer(server.url, room.code, n)));
    for (const { pad } of ghosts) pad.close();
    await stage.next("roster", (m) => m.players.length === 3 && m.players.every((p) => !p.online));

    const { pad, you } = await joinPlayer(server.url, room.code, "Real Student");
    expect(you.nickname).toBe("Real Student");
    await stage.next("roster", (m) => m.players.length === 4);

    const from = stage.messages.length;
    stage.send({ type: "host", action: "clear-offline" });
    const cleared = await stage.next("roster", () => true, from);
    expect(cleared.players).toMatchObject([{ nickname: "Real Student", online: true }]);
    // A cleared seat is gone for good: its token no longer takes it back.
    const back = await ScriptedSocket.open(server.url);
    back.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code, seatToken: ghosts[0]!.you.seatToken });
    expect((await back.next("error")).code).toBe("unknown-player");
    back.close();
    pad.close();
    stage.close();
  });
});
