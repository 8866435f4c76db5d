/**
 * Opening a room's WebSocket (docs/protocol.md), early when the page allows: a pad's socket may be opened as soon
 * as the browser runs the page's code, before React hydrates it. On a cheap phone hydration takes a second or more,
 * and the handshake's round trip then overlaps it instead of following it. The server says nothing before the
 * hello, which useRoomSocket sends once it holds the socket, so an early socket misses nothing.
 */

// The code in the URL lets a load balancer send every socket of the room to the node that runs it.
const roomSocketUrl = (code: string) => `${location.protocol === "https:" ? "wss" : "ws"}://${location.host}/ws?room=${encodeURIComponent(code)}`;

/** A socket opened while the page still loads, until the hook takes it (or it is given up). */
let early: { code: string; socket: WebSocket } | null = null;
/** Rooms whose hook already holds a socket: a page reloading its data opens no second one. */
const held = new Set<string>();
/** A page that never takes its early socket (the room turned out to be gone) does not keep it open. */
export const EARLY_SOCKET_UNCLAIMED_MS = 30_000;

export function openRoomSocketEarly(code: string) {
  if (early || held.has(code)) return;
  const socket = new WebSocket(roomSocketUrl(code));
  early = { code, socket };
  setTimeout(() => {
    if (early?.socket !== socket) return;
    early = null;
    socket.close(1000);
  }, EARLY_SOCKET_UNCLAIMED_MS);
}

/**
 * A socket for the room: on the first try the early one if it is for this room and still connecting or open,
 * else a new one. The caller handles an early socket that is already open (its open event has passed).
 */
export function roomSocket(code: string, firstTry: boolean): WebSocket {
  const taken = firstTry ? early : null;
  if (taken) {
    early = null;
    if (taken.code === code && taken.socket.readyState <= WebSocket.OPEN) return taken.socket;
    taken.socket.close(1000);
  }
  return new WebSocket(roomSocketUrl(code));
}

/** Marks the room's socket as held by a mounted hook; returns the release. */
export function holdRoomSocket(code: string): () => void {
  held.add(code);
  return () => held.delete(code);
}
