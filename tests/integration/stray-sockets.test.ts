import { connect, type Socket } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CLOSE_CODES, PROTOCOL_VERSION } from "~/game/protocol";
import { CLOSE_GRACE_MS } from "../../server/sockets";
import { openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";
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
