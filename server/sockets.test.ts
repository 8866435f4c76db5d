import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { afterEach, describe, expect, it } from "vitest";
import { WebSocket } from "ws";
import { attachSockets, socketRoomOf, type SocketHost } from "./sockets";

const HEARTBEAT = 320;
let server: Server;
let host: SocketHost;

async function start() {
  server = createServer();
  host = attachSockets(server, { allowOrigin: () => true, maxPayload: 1024, heartbeatMs: HEARTBEAT });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  return `ws://127.0.0.1:${(server.address() as AddressInfo).port}/ws`;
}

const open = (url: string, autoPong = true) =>
  new Promise<WebSocket>((resolve, reject) => {
    const ws = new WebSocket(url, { autoPong });
    ws.once("open", () => resolve(ws));
    ws.once("error", reject);
  });

afterEach(async () => {
  await host.close();
  await new Promise((r) => server.close(r));
});

describe("heartbeat", () => {
  it("ends a peer that stops answering pings and keeps one that answers", async () => {
    const url = await start();
    const silent = await open(url, false);
    const healthy = await open(url);
    const closed = new Promise((r) => silent.once("close", r));
    await closed;
    // Ended within two heartbeats (one ping unanswered, then the end at its next turn).
    await new Promise((r) => setTimeout(r, HEARTBEAT));
    expect(healthy.readyState).toBe(WebSocket.OPEN);
    healthy.close();
  });

  it("pings every socket once a heartbeat, a slice at a time rather than all at once", async () => {
    const url = await start();
    const sockets = await Promise.all(Array.from({ length: 32 }, () => open(url)));
    const pings: number[][] = sockets.map(() => []);
    const t0 = performance.now();
    sockets.forEach((ws, i) => ws.on("ping", () => pings[i]!.push(performance.now() - t0)));
    await new Promise((r) => setTimeout(r, HEARTBEAT * 2.5));
    // Every socket pinged about once per heartbeat…
    for (const times of pings) expect(times.length).toBeGreaterThanOrEqual(2);
    // …but the first pings are spread over the heartbeat: no moment has more than a slice's share.
    const firsts = pings.map((t) => Math.floor(t[0]! / (HEARTBEAT / 16)));
    const largestMoment = Math.max(...[...new Set(firsts)].map((m) => firsts.filter((x) => x === m).length));
    expect(largestMoment).toBeLessThanOrEqual(4);
    for (const ws of sockets) ws.close();
  });
});

describe("socket paths", () => {
  it.each([
    ["/ws", null],
    ["/ws?room=KMNPRT", "KMNPRT"],
    ["/ws?room=kmn-prt", "KMNPRT"],
    ["/ws/KMNPRT", "KMNPRT"],
    ["/ws/kmnprt?x=1", "KMNPRT"],
    ["/ws/", null],
    ["/ws/KMNPRT/more", undefined],
    ["/wsx", undefined],
    ["/play/KMNPRT", undefined],
  ])("%s names room %s", (url, room) => {
    expect(socketRoomOf(url)).toBe(room);
  });

  it("upgrades on /ws, /ws?room= and /ws/<code>, and refuses other paths", async () => {
    const url = await start();
    for (const path of ["", "?room=KMNPRT", "/KMNPRT"]) (await open(url + path)).close();
    await expect(open(url.replace(/\/ws$/, "/play/KMNPRT"))).rejects.toThrow(/404/);
  });
});
