import { createServer, type IncomingMessage, type Server } from "node:http";
import { createServer as createTcpServer, type AddressInfo, type Socket } from "node:net";
import type { Duplex } from "node:stream";
import { afterEach, describe, expect, it } from "vitest";
import WebSocket, { WebSocketServer } from "ws";
import { attachSockets } from "../sockets";
import { forwardedHead, pipeUpgrade } from "./forward";
import { freePort } from "./redis-server";

const closers: (() => void)[] = [];
afterEach(() => {
  for (const close of closers.splice(0)) close();
});

/** An HTTP server whose upgrades go to `onUpgrade`, on a free loopback port. */
async function listen(onUpgrade: (req: IncomingMessage, socket: Duplex, head: Buffer) => void): Promise<{ server: Server; address: string }> {
  const server = createServer((_req, res) => res.writeHead(404).end());
  server.on("upgrade", onUpgrade);
  await new Promise<void>((done) => server.listen(0, "127.0.0.1", done));
  closers.push(() => {
    server.closeAllConnections();
    server.close();
  });
  return { server, address: `127.0.0.1:${(server.address() as AddressInfo).port}` };
}

/** The owner: a WebSocket server that echoes, and remembers the headers each upgrade came with. */
async function owner() {
  const wss = new WebSocketServer({ noServer: true });
  const seen: IncomingMessage[] = [];
  const node = await listen((req, socket, head) => {
    seen.push(req);
    wss.handleUpgrade(req, socket, head, (ws) => ws.on("message", (m) => ws.send(`owner: ${String(m)}`)));
  });
  closers.push(() => wss.close());
  return { ...node, seen };
}

/** The node a client reached: it forwards every upgrade to `to`, and serves it itself (an echo of its own) when the owner does not answer. */
async function forwarder(to: string, answerMs = 300) {
  const local = new WebSocketServer({ noServer: true });
  closers.push(() => local.close());
  const outcomes: boolean[] = [];
  const node = await listen((req, socket, head) => {
    void pipeUpgrade(to, req, head, socket, "node-f", answerMs).then((piped) => {
      outcomes.push(piped);
      if (!piped) local.handleUpgrade(req, socket, head, (ws) => ws.on("message", (m) => ws.send(`here: ${String(m)}`)));
    });
  });
  return { ...node, outcomes };
}

/** One message there and back over a socket opened on `address`. */
async function roundTrip(address: string, headers: Record<string, string> = {}) {
  const ws = new WebSocket(`ws://${address}/ws?room=ABCD23`, { headers });
  await new Promise((resolve, reject) => ws.once("open", resolve).once("error", reject));
  ws.send("hi");
  const reply = await new Promise<string>((resolve) => ws.once("message", (m) => resolve(String(m))));
  ws.close();
  return reply;
}

describe("forwardedHead", () => {
  it("keeps the request, adds this hop to X-Forwarded-For and marks it forwarded (a client's own mark is dropped)", () => {
    const req = {
      method: "GET",
      url: "/ws?room=ABCD23",
      httpVersion: "1.1",
      rawHeaders: ["Host", "school.example", "X-Forwarded-For", "203.0.113.9", "X-Fretcall-Forwarded", "forged", "Upgrade", "websocket"],
      socket: { remoteAddress: "127.0.0.1" },
    } as unknown as IncomingMessage;
    expect(forwardedHead(req, "node-f").split("\r\n")).toEqual([
      "GET /ws?room=ABCD23 HTTP/1.1",
      "Host: school.example",
      "Upgrade: websocket",
      "X-Forwarded-For: 203.0.113.9, 127.0.0.1",
      "X-Fretcall-Forwarded: node-f",
      "",
      "",
    ]);
  });
});

describe("pipeUpgrade", () => {
  it("joins the client to the owner: the WebSocket runs end to end, and the owner sees where it came from", async () => {
    const o = await owner();
    const f = await forwarder(o.address);
    expect(await roundTrip(f.address, { "X-Forwarded-For": "198.51.100.7" })).toBe("owner: hi");
    expect(f.outcomes).toEqual([true]);
    expect(o.seen[0]!.headers).toMatchObject({ "x-fretcall-forwarded": "node-f", "x-forwarded-for": "198.51.100.7, 127.0.0.1" });
  });

  it("leaves the client untouched when the owner is gone (nothing listens)", async () => {
    const f = await forwarder(`127.0.0.1:${await freePort()}`);
    expect(await roundTrip(f.address)).toBe("here: hi");
    expect(f.outcomes).toEqual([false]);
  });

  it("leaves the client untouched when the owner accepts but never answers (a paused process)", async () => {
    const held: Socket[] = [];
    const silent = createTcpServer((socket) => void held.push(socket));
    await new Promise<void>((done) => silent.listen(0, "127.0.0.1", done));
    closers.push(() => {
      for (const s of held) s.destroy();
      silent.close();
    });
    const f = await forwarder(`127.0.0.1:${(silent.address() as AddressInfo).port}`, 300);
    const started = Date.now();
    expect(await roundTrip(f.address)).toBe("here: hi");
    expect(Date.now() - started).toBeGreaterThanOrEqual(290);
    expect(f.outcomes).toEqual([false]);
  });

  it("a node that stops cuts off the sockets it piped, so they reconnect elsewhere", async () => {
    const o = await owner();
    const server = createServer();
    const host = attachSockets(server, { allowOrigin: () => true, maxPayload: 1024, divert: (req, socket, head) => pipeUpgrade(o.address, req, head, socket, "node-f") });
    await new Promise<void>((done) => server.listen(0, "127.0.0.1", done));
    closers.push(() => server.close());
    const address = `127.0.0.1:${(server.address() as AddressInfo).port}`;
    const ws = new WebSocket(`ws://${address}/ws?room=ABCD23`);
    await new Promise((resolve, reject) => ws.once("open", resolve).once("error", reject));
    const closed = new Promise((resolve) => ws.once("close", resolve));
    await host.close();
    await closed;
    // The owner itself goes on serving.
    expect(await roundTrip(o.address)).toBe("owner: hi");
  });
});
