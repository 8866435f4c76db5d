import { afterEach, describe, expect, it } from "vitest";
import WebSocket, { WebSocketServer } from "ws";
import type { RoundTrip } from "~/game/clock";
import { RoundTripTimer } from "./round-trips";

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const closing: (() => void)[] = [];
afterEach(() => {
  for (const close of closing.splice(0)) close();
});

/** A server socket timed by a RoundTripTimer, and the client at the other end (which answers pings itself only if `autoPong`). */
async function pair(opts: { autoPong: boolean; seated?: () => boolean; steady?: () => boolean; everyMs?: number }) {
  const wss = new WebSocketServer({ port: 0, host: "127.0.0.1" });
  await new Promise((r) => wss.once("listening", r));
  const trips: RoundTrip[] = [];
  const timed = new Promise<RoundTripTimer>((resolve) =>
    wss.once("connection", (ws) => resolve(
        new RoundTripTimer(
          ws,
          opts.seated ?? (() => true),
          (t) => trips.push(t),
          () => (opts.steady?.() ? 5 : 1),
          opts.everyMs ?? 60_000,
        ),
      ),),
  );
  const client = new WebSocket(`ws://127.0.0.1:${(wss.address() as { port: number }).port}`, { autoPong: opts.autoPong });
  await new Promise((r) => client.once("open", r));
  closing.push(() => {
    client.terminate();
    wss.close();
  });
  return { timer: await timed, client, trips };
}

describe("RoundTripTimer", () => {
  it("times a ping to its pong", async () => {
    const { timer, client, trips } = await pair({ autoPong: false });
    client.on("ping", (data) => setTimeout(() => client.pong(data), 120));
    timer.ping();
    await sleep(300);
    expect(trips).toHaveLength(1);
    expect(trips[0]!.ms).toBeGreaterThanOrEqual(115);
  });

  it("ignores pongs it did not ask for: a pong sent ahead of its ping cannot make a link look fast", async () => {
    const { timer, client, trips } = await pair({ autoPong: false });
    client.pong(Buffer.alloc(8));
    client.pong();
    timer.ping();
    client.pong(Buffer.alloc(8, 1));
    await sleep(100);
    expect(trips).toEqual([]);
  });

  it("pings only a socket that holds a seat", async () => {
    let seated = false;
    const { timer, trips } = await pair({ autoPong: true, seated: () => seated });
    timer.ping();
    await sleep(100);
    expect(trips).toEqual([]);
    seated = true;
    timer.ping();
    await sleep(100);
    expect(trips).toHaveLength(1);
  });

  it("pings a steady seat less often, and at the full rate again once its link jumps", async () => {
    let steady = false;
    const { client, trips } = await pair({ autoPong: true, steady: () => steady, everyMs: 50 });
    let pings = 0;
    client.on("ping", () => pings++);
    const rate = async (ms: number) => {
      const from = pings;
      await sleep(ms);
      return ((pings - from) * 1000) / ms;
    };
    const fast = await rate(1_000);
    steady = true;
    // A few round trips on the fast schedule first, then the slow one.
    await sleep(400);
    const slow = await rate(1_500);
    steady = false;
    await sleep(400);
    const again = await rate(1_000);
    console.log(`pings a second: ${fast.toFixed(1)} unsteady, ${slow.toFixed(1)} steady, ${again.toFixed(1)} after a jump`);
    expect(trips.length).toBeGreaterThan(10);
    expect(fast).toBeGreaterThan(2.5 * slow);
    expect(again).toBeGreaterThan(2.5 * slow);
  });
});
