import type { Socket } from "node:net";
import { afterEach, describe, expect, it, vi } from "vitest";
import WebSocket, { WebSocketServer } from "ws";
import { networkFigures, ROUND_TRIP_WINDOW_MS } from "~/game/clock";
import type { ServerMessage } from "~/game/protocol";
import { addSeatRoundTrip, newSeatClock, seatFigures, send, sendLatest, sendNow, type Conn } from "./live-room";
import { RoundTripTimer } from "./round-trips";

const closing: (() => void)[] = [];
afterEach(() => {
  for (const close of closing.splice(0)) close();
});

/** A server-side socket as the hub holds it, and the client at the other end with what it received. */
async function pair() {
  const wss = new WebSocketServer({ port: 0, host: "127.0.0.1" });
  await new Promise((r) => wss.once("listening", r));
  const server = new Promise<WebSocket>((resolve) => wss.once("connection", resolve));
  const client = new WebSocket(`ws://127.0.0.1:${(wss.address() as { port: number }).port}`);
  const got: string[] = [];
  client.on("message", (data) => got.push(String(data)));
  client.on("ping", () => got.push("(ping)"));
  await new Promise((r) => client.once("open", r));
  closing.push(() => {
    client.terminate();
    wss.close();
  });
  const ws = await server;
  const socket = (ws as unknown as { _socket: Socket })._socket;
  // A seat pinged every ten minutes (never by its own turn in a test), first as it is taken.
  const roundTrips = new RoundTripTimer(ws, () => true, () => {}, () => 1, 600_000);
  roundTrips.ping();
  await until(() => got.length === 1);
  got.length = 0;
  // The system calls that write to the socket: one per write, however many frames it carries.
  const writes = { count: 0 };
  for (const method of ["_write", "_writev"] as const) {
    const writer = socket as unknown as Record<string, (...args: unknown[]) => void>;
    const original = writer[method]!.bind(socket);
    writer[method] = (...args: unknown[]) => {
      writes.count++;
      original(...args);
    };
  }
  return { conn: { ws, roundTrips } as Conn, socket, got, writes };
}

const turn = () => new Promise((r) => setImmediate(r));
const until = async (done: () => boolean) => {
  for (let i = 0; i < 100 && !done(); i++) await new Promise((r) => setTimeout(r, 10));
};

describe("send", () => {
  it("holds a turn's frames for a socket back and writes them together after the turn, in order", async () => {
    const { conn, socket, got } = await pair();
    send(conn, "a");
    send(conn, Buffer.from("b"));
    send(conn, "c");
    expect(socket.writableCorked).toBe(1);
    await turn();
    expect(socket.writableCorked).toBe(0);
    await until(() => got.length === 3);
    expect(got).toEqual(["a", "b", "c"]);
  });

  it("writes a time-stamped frame at once, after what was held back, in one write", async () => {
    const { conn, socket, got, writes } = await pair();
    send(conn, "a");
    sendNow(conn, "pong");
    expect(socket.writableCorked).toBe(0);
    await until(() => got.length === 2);
    expect(got).toEqual(["a", "pong"]);
    expect(writes.count).toBe(1);
  });

  it("lets a due round-trip ping ride in the same write as the frames, and no ping that is not due", async () => {
    // A ten-minute interval, so its slice's own turn never comes during the test; the clock it reads is moved by hand.
    const { conn, got, writes } = await pair();
    vi.useFakeTimers({ toFake: ["performance"] });
    try {
      // Just pinged as the seat was taken: not due yet, so the frame goes alone.
      send(conn, "a");
      await turn();
      await until(() => got.length === 1);
      expect(got).toEqual(["a"]);
      expect(writes.count).toBe(1);
      // Over three quarters of the interval later one is due: it goes in the frame's write, after it.
      vi.advanceTimersByTime(460_000);
      writes.count = 0;
      send(conn, "b");
      await turn();
      await until(() => got.length === 3);
      expect(got.slice(1)).toEqual(["b", "(ping)"]);
      expect(writes.count).toBe(1);
      // And once more with a time-stamped frame.
      vi.advanceTimersByTime(460_000);
      writes.count = 0;
      sendNow(conn, "pong");
      await until(() => got.length === 5);
      expect(got.slice(3)).toEqual(["pong", "(ping)"]);
      expect(writes.count).toBe(1);
    } finally {
      vi.useRealTimers();
    }
  });
});

describe("sendLatest", () => {
  const count = (n: number): ServerMessage => ({ type: "answered", promptId: "p1", count: n, of: 40, offline: 0 });

  it("sends only the last of a turn's counts, at the end of the turn", async () => {
    const { conn, got } = await pair();
    for (let n = 1; n <= 40; n++) sendLatest(conn, count(n));
    await turn();
    await until(() => got.length === 1);
    await new Promise((r) => setTimeout(r, 50));
    expect(got.map((m) => JSON.parse(m) as ServerMessage)).toEqual([count(40)]);
  });

  it("keeps the order: a count held back goes out before whatever is sent after it", async () => {
    const { conn, got } = await pair();
    sendLatest(conn, count(1));
    sendLatest(conn, count(2));
    send(conn, '"reveal"');
    sendLatest(conn, count(3));
    sendNow(conn, '"pong"');
    await until(() => got.length === 4);
    expect(got).toEqual([JSON.stringify(count(2)), '"reveal"', JSON.stringify(count(3)), '"pong"']);
  });
});

describe("addSeatRoundTrip", () => {
  it("keeps those of the last minute only", () => {
    const sync = newSeatClock();
    for (let at = 0; at <= 90_000; at += 1_000) addSeatRoundTrip(sync, { at, ms: at < 30_000 ? 900 : 40 });
    expect(sync.trips).toHaveLength(60);
    expect(sync.trips.every((t) => t.at > 90_000 - ROUND_TRIP_WINDOW_MS)).toBe(true);
  });

  it("drops an impossible round trip", () => {
    const sync = newSeatClock();
    addSeatRoundTrip(sync, { at: 5, ms: -1 });
    addSeatRoundTrip(sync, { at: 6, ms: Number.NaN });
    expect(sync.trips).toEqual([]);
  });
});

describe("seatFigures", () => {
  it("are the figures of the round trips in the window at the time asked, sorted out again only when they change", () => {
    const sync = newSeatClock();
    expect(seatFigures(sync, 0)).toBeNull();
    for (const [at, ms] of [[1_000, 40], [2_000, 20], [3_000, 90]] as const) addSeatRoundTrip(sync, { at, ms });
    const first = seatFigures(sync, 3_500);
    expect(first).toEqual(networkFigures(sync.trips, 3_500));
    expect(first).toMatchObject({ lowMs: 20, highMs: 90, samples: 3 });
    // Nothing new and nothing left the window: the same figures, not sorted out again.
    expect(seatFigures(sync, 4_000)).toBe(first);
    // The first trip leaves the window.
    expect(seatFigures(sync, 1_000 + ROUND_TRIP_WINDOW_MS)).toMatchObject({ lowMs: 20, highMs: 90, samples: 2 });
    addSeatRoundTrip(sync, { at: 1_000 + ROUND_TRIP_WINDOW_MS + 1, ms: 10 });
    expect(seatFigures(sync, 1_000 + ROUND_TRIP_WINDOW_MS + 2)).toMatchObject({ lowMs: 10, samples: 3 });
  });
});
