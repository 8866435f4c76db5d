import type { IncomingMessage, Server } from "node:http";
import type { Duplex } from "node:stream";
import { WebSocketServer, type WebSocket } from "ws";

export const HEARTBEAT_MS = 15_000;
/**
 * The sockets are pinged a slice at a time, so each is still pinged once every heartbeat but a
 * whole school's pings (and the pongs that answer them) never come in one burst.
 */
const HEARTBEAT_SLICES = 16;
/** Close code sent to every socket when the server stops (RFC 6455 §7.4.1 "going away"). */
export const CLOSE_GOING_AWAY = 1001;

export interface SocketHost {
  wss: WebSocketServer;
  close(): void;
}

/**
 * The WebSocket server on /ws: we handle the upgrade ourselves (noServer) so other upgrade
 * paths are refused, and a ping every heartbeat ends peers that stopped answering.
 */
export function attachSockets(
  server: Server,
  opts: {
    allowOrigin: (req: IncomingMessage) => boolean;
    /** Counts the connection against its address's limit; a refusal is answered 429. */
    admit?: (req: IncomingMessage) => Promise<{ retryAfter: number; message: string } | undefined>;
    maxPayload: number;
    heartbeatMs?: number;
  },
): SocketHost {
  const wss = new WebSocketServer({ noServer: true, maxPayload: opts.maxPayload });
  const alive = new WeakMap<WebSocket, boolean>();
  const slices = Array.from({ length: HEARTBEAT_SLICES }, () => new Set<WebSocket>());
  let joined = 0;
  let tick = 0;

  server.on("upgrade", (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    const path = (req.url ?? "").split("?")[0];
    if (path !== "/ws") return; // other upgrades (Vite's HMR in development) belong to their owners
    if (!opts.allowOrigin(req)) {
      socket.end("HTTP/1.1 403 Forbidden\r\nConnection: close\r\n\r\n");
      return;
    }
    void (async () => {
      const refused = await opts.admit?.(req);
      if (refused) {
        const body = Buffer.from(refused.message);
        socket.end(
          `HTTP/1.1 429 Too Many Requests\r\nRetry-After: ${refused.retryAfter}\r\nContent-Type: text/plain; charset=utf-8\r\n` +
            `Content-Length: ${body.length}\r\nConnection: close\r\n\r\n${body}`,
        );
        return;
      }
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
    close() {
      clearInterval(timer);
      for (const ws of wss.clients) ws.close(CLOSE_GOING_AWAY, "server is stopping");
      wss.close();
    },
  };
}
