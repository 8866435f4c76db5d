import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";

/** Stands in for the browser's WebSocket: records what was opened and closed. */
class FakeSocket {
  static CONNECTING = 0;
  static OPEN = 1;
  static CLOSING = 2;
  static CLOSED = 3;
  static opened: FakeSocket[] = [];
  readyState = FakeSocket.CONNECTING;
  closedWith: number | null = null;
  constructor(readonly url: string) {
    FakeSocket.opened.push(this);
  }
  close(code: number) {
    this.closedWith = code;
    this.readyState = FakeSocket.CLOSED;
  }
}

// The module keeps one early socket per page: each test loads a fresh copy.
const load = () => import("./roomSocket");

beforeEach(() => {
  vi.resetModules();
  vi.useFakeTimers();
  FakeSocket.opened = [];
  vi.stubGlobal("WebSocket", FakeSocket);
  vi.stubGlobal("location", { protocol: "https:", host: "school.example" });
});
afterEach(() => {
  vi.useRealTimers();
  vi.unstubAllGlobals();
});

describe("a room's socket", () => {
  it("is opened early once and taken by the hook's first try for the same room", async () => {
    const { openRoomSocketEarly, roomSocket } = await load();
    openRoomSocketEarly("KMNPRT");
    openRoomSocketEarly("KMNPRT");
    expect(FakeSocket.opened.map((s) => s.url)).toEqual(["wss://school.example/ws?room=KMNPRT"]);
    expect(roomSocket("KMNPRT", true)).toBe(FakeSocket.opened[0]);
    // Taken: the unclaimed timer leaves it alone.
    vi.advanceTimersByTime(60_000);
    expect(FakeSocket.opened[0]!.closedWith).toBeNull();
  });

  it("is taken when already open, but a closed one is replaced", async () => {
    const { openRoomSocketEarly, roomSocket } = await load();
    openRoomSocketEarly("KMNPRT");
    FakeSocket.opened[0]!.readyState = FakeSocket.OPEN;
    expect(roomSocket("KMNPRT", true)).toBe(FakeSocket.opened[0]);
    openRoomSocketEarly("KMNPRT");
    FakeSocket.opened[1]!.readyState = FakeSocket.CLOSED;
    const fresh = roomSocket("KMNPRT", true);
    expect(fresh).toBe(FakeSocket.opened[2]);
  });

  it("is closed when the page is for another room, and a new one opened", async () => {
    const { openRoomSocketEarly, roomSocket } = await load();
    openRoomSocketEarly("KMNPRT");
    const socket = roomSocket("WXYZ23", true);
    expect(FakeSocket.opened[0]!.closedWith).toBe(1000);
    expect(socket.url).toBe("wss://school.example/ws?room=WXYZ23");
  });

  it("is new on a reconnect, never the early one", async () => {
    const { openRoomSocketEarly, roomSocket } = await load();
    openRoomSocketEarly("KMNPRT");
    expect(roomSocket("KMNPRT", false)).not.toBe(FakeSocket.opened[0]);
  });

  it("is closed if nobody takes it in time (the room was gone)", async () => {
    const { EARLY_SOCKET_UNCLAIMED_MS, openRoomSocketEarly, roomSocket } = await load();
    openRoomSocketEarly("KMNPRT");
    vi.advanceTimersByTime(EARLY_SOCKET_UNCLAIMED_MS);
    expect(FakeSocket.opened[0]!.closedWith).toBe(1000);
    expect(roomSocket("KMNPRT", true)).toBe(FakeSocket.opened[1]);
  });

  it("is not opened early while a hook holds the room's socket, and is again after it lets go", async () => {
    const { holdRoomSocket, openRoomSocketEarly } = await load();
    const release = holdRoomSocket("KMNPRT");
    openRoomSocketEarly("KMNPRT");
    expect(FakeSocket.opened).toHaveLength(0);
    release();
    openRoomSocketEarly("KMNPRT");
    expect(FakeSocket.opened).toHaveLength(1);
  });
});
