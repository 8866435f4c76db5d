import { connect, type Socket } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CLOSE_CODES, PROTOCOL_VERSION } from "~/game/protocol";
import { CLOSE_GRACE_MS } from "../../server/sockets";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";
import { seedDemo } from "../../server/seed";
import { startTestServer, type TestServer } from "./harness";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

/** A raw TCP client that sends an upgrade request and records what comes back and whether the server hung up. */
function rawUpgrade(port: number, path: string) {
  const socket: Socket = connect(port, "127.0.0.1");
  let received = "";
  socket.on("data", (d) => (received += d.toString("latin1")));
  const ended = new Promise<void>((done) => socket.once("close", () => done()));
  socket.write(
    `GET ${path} HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\nConnection: Upgrade\r\nUpgrade: websocket\r\n` +
      `Sec-WebSocket-Version: 13\r\nSec-WebSocket-Key: dGhlIHNhbXBsZSBub25jZQ==\r\n\r\n`,
  );
  return { socket, ended, received: () => received };
}

const within = <T>(ms: number, p: Promise<T>) =>
  Promise.race([p, new Promise<never>((_, reject) => setTimeout(() => reject(new Error(`not within ${ms} ms`)), ms))]);

describe("stray connections", () => {
  it("answers an upgrade on another path with 404 and closes it at once", async () => {
    const raw = rawUpgrade(server.port, "/other");
    await within(2_000, raw.ended);
    expect(raw.received()).toMatch(/^HTTP\/1\.1 404 /);
  });

  it("closes a socket that never says hello, and keeps one that did", async () => {
    server.hub.helloTimeoutMs = 300;
    try {
      const room = await openTestRoom(server.services.db);
      const silent = await ScriptedSocket.open(server.url);
      const greeted = await ScriptedSocket.open(server.url);
      greeted.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
      await greeted.next("welcome");
      expect((await silent.waitClose(2_000)).code).toBe(CLOSE_CODES.helloTimeout);
      await new Promise((r) => setTimeout(r, 300));
      expect(greeted.closed).toBeNull();
      greeted.close();
    } finally {
      server.hub.helloTimeoutMs = 10_000;
    }
  });
});

describe("stopping", () => {
  it("finishes within the grace period while a client holds a socket open and ignores close frames", async () => {
    const own = await startTestServer();
    // Upgraded, then deaf: it reads nothing and never answers the close frame.
    const raw = rawUpgrade(own.port, "/ws");
    await within(2_000, new Promise<void>((done) => raw.socket.once("data", () => done())));
    expect(raw.received()).toMatch(/^HTTP\/1\.1 101 /);
    raw.socket.pause();
    const started = Date.now();
    await within(CLOSE_GRACE_MS + 3_000, own.close());
    expect(Date.now() - started).toBeLessThan(CLOSE_GRACE_MS + 3_000);
    raw.socket.resume();
    await within(1_000, raw.ended);
  }, 15_000);
});

describe("one socket, one seat", () => {
  it("gives a socket alternating hello and join one seat at most", async () => {
    const room = await openTestRoom(server.services.db);
    const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
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
    const stage = await openStage(server.url, server.services.env.SESSION_SECRET, room);
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
