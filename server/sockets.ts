import type { IncomingMessage, Server } from "node:http";
import type { Duplex } from "node:stream";
import { WebSocketServer, type WebSocket } from "ws";
import { normaliseRoomCode } from "~/game/roomCode";

export const HEARTBEAT_MS = 15_000;
/**
 * The sockets are pinged a slice at a time, so each is still pinged once every heartbeat but a
 * whole school's pings (and the pongs that answer them) never come in one burst.
 */
const HEARTBEAT_SLICES = 16;
/** Close code sent to every socket when the server stops (RFC 6455 §7.4.1 "going away"). */
export const CLOSE_GOING_AWAY = 1001;
/** How long stopping waits for sockets to answer their 1001 before it cuts them off. */
export const CLOSE_GRACE_MS = 2_000;

export interface SocketHost {
  wss: WebSocketServer;
  /** Resolves once every socket is gone: closed by its peer, or cut off after the grace period. */
  close(): Promise<void>;
}

/**
 * The room code a WebSocket URL names: `/ws?room=<CODE>` or `/ws/<CODE>`; null for a bare `/ws`
 * (older pages, which name the room only in their hello); undefined when the path is not a socket path
 * at all. The code in the URL is what a load balancer routes on (server/cluster/nginx.ts); the hello
 * still decides which room the socket joins.
 */
export function socketRoomOf(url: string): string | null | undefined {
  let parsed: URL;
  try {
    parsed = new URL(url, "http://socket.invalid");
  } catch {
    return undefined;
  }
  const inPath = /^\/ws(?:\/([^/]+))?\/?$/.exec(parsed.pathname);
  if (!inPath) return undefined;
  // Room codes are plain letters and digits: nothing to percent-decode.
  const code = inPath[1] ?? parsed.searchParams.get("room");
  return code ? normaliseRoomCode(code) : null;
}

/** Answers an upgrade that will not become a WebSocket, and ends the connection once that is written. */
function refuseUpgrade(socket: Duplex, status: string, headers: string[] = [], body = "") {
  const bytes = Buffer.from(body);
  const head = [`HTTP/1.1 ${status}`, ...headers, "Content-Type: text/plain; charset=utf-8", `Content-Length: ${bytes.length}`, "Connection: close"];
  // Destroyed, not just ended: a peer that never closes its side must not hold a stopping server open.
  socket.end(`${head.join("\r\n")}\r\n\r\n${body}`, () => socket.destroy());
}

/**
 * The WebSocket server on /ws (and /ws/<code>): we handle the upgrade ourselves (noServer) so other upgrade
 * paths are refused (404, connection closed), and a ping every heartbeat ends peers that stopped answering.
 */
export function attachSockets(
  server: Server,
  opts: {
    allowOrigin: (req: IncomingMessage) => boolean;
    /** Counts the connection against its address's limit; a refusal is answered 429. */
    admit?: (req: IncomingMessage) => Promise<{ retryAfter: number; message: string } | undefined>;
    /** Cluster mode: hands the upgrade to the room's owner (server/cluster/forward.ts); true when it did. */
    divert?: (req: IncomingMessage, socket: Duplex, head: Buffer) => Promise<boolean>;
    maxPayload: number;
    heartbeatMs?: number;
    closeGraceMs?: number;
  },
): SocketHost {
  const wss = new WebSocketServer({ noServer: true, maxPayload: opts.maxPayload });
  const alive = new WeakMap<WebSocket, boolean>();
  const slices = Array.from({ length: HEARTBEAT_SLICES }, () => new Set<WebSocket>());
  let joined = 0;
  let tick = 0;
  // Upgrades still waiting for their admission check or piped to another node: stopping cuts them off too.
  const pending = new Set<Duplex>();

  server.on("upgrade", (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    // Nothing else upgrades on this server (Vite's HMR in development has a port of its own).
    if (socketRoomOf(req.url ?? "") === undefined) return refuseUpgrade(socket, "404 Not Found", [], "WebSocket connections are made on /ws.");
    if (!opts.allowOrigin(req)) return refuseUpgrade(socket, "403 Forbidden");
    pending.add(socket);
    void (async () => {
      // Piped to the room's owner, which counts it against the address's limit; kept in `pending`
      // while it lasts, so stopping cuts it off too.
      if (await opts.divert?.(req, socket, head).catch(() => false)) {
        if (socket.destroyed) pending.delete(socket);
        else socket.once("close", () => pending.delete(socket));
        return;
      }
      const refused = await opts.admit?.(req);
      pending.delete(socket);
      if (refused) return refuseUpgrade(socket, "429 Too Many Requests", [`Retry-After: ${refused.retryAfter}`], refused.message);
      if (socket.destroyed) return;
      wss.handleUpgrade(req, socket, head, (ws) => wss.emit("connection", ws, req));
    })();
  });

  wss.on("connection", (ws) => {
    const slice = slices[joined++ % HEARTBEAT_SLICES]!;
    slice.add(ws);
    alive.set(ws, true);
    ws.on("pong", () => alive.set(ws, true));
    ws.on("close", () => slice.delete(ws));
  });

  const timer = setInterval(
    () => {
      for (const ws of slices[tick++ % HEARTBEAT_SLICES]!) {
        if (!alive.get(ws)) {
          ws.terminate();
          continue;
        }
        alive.set(ws, false);
        ws.ping();
      }
    },
    (opts.heartbeatMs ?? HEARTBEAT_MS) / HEARTBEAT_SLICES,
  );
  timer.unref();

  return {
    wss,
    async close() {
      clearInterval(timer);
      for (const socket of pending) socket.destroy();
      for (const ws of wss.clients) ws.close(CLOSE_GOING_AWAY, "server is stopping");
      const closed = new Promise<void>((done) => wss.close(() => done()));
      const grace = new Promise<void>((done) => setTimeout(done, opts.closeGraceMs ?? CLOSE_GRACE_MS).unref());
      await Promise.race([closed, grace]);
      // A peer that ignores the close frame would otherwise keep the server open for ws's own 30 s.
      for (const ws of wss.clients) ws.terminate();
      await closed;
    },
  };
}
