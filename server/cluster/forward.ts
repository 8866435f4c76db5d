/**
 * A room's sockets reach the node that owns it even when the load balancer sends them elsewhere
 * (its ring changed as a node came back, or a client connected directly): the upgrade request is
 * written again to the owner's NODE_ADDRESS and the two connections are piped together, so the
 * WebSocket runs end to end with the owner. An owner that does not answer is waited out: its lease
 * lapses within the TTL, and this node then takes the room at the socket's hello.
 */
import type { IncomingMessage } from "node:http";
import { connect, type Socket } from "node:net";
import type { Duplex } from "node:stream";
import { socketRoomOf } from "../sockets";
import type { LeaseOwner, Leases } from "./leases";

/** Marks a forwarded upgrade: it is served where it lands, never forwarded again (no loops). */
export const FORWARDED_HEADER = "x-fretcall-forwarded";
/** How long the owner has to connect and answer the upgrade before it counts as gone. */
export const OWNER_ANSWER_MS = 1_500;

/** The upgrade request as it came, for the owner: one hop more in X-Forwarded-For, and marked as forwarded. */
export function forwardedHead(req: IncomingMessage, fromNode: string): string {
  const lines = [`${req.method} ${req.url} HTTP/${req.httpVersion}`];
  const raw = req.rawHeaders;
  let forwardedFor: string | undefined;
  for (let i = 0; i < raw.length; i += 2) {
    const name = raw[i]!.toLowerCase();
    if (name === "x-forwarded-for") forwardedFor = forwardedFor ? `${forwardedFor}, ${raw[i + 1]}` : raw[i + 1];
    else if (name !== FORWARDED_HEADER) lines.push(`${raw[i]}: ${raw[i + 1]}`);
  }
  const peer = req.socket.remoteAddress ?? "unknown";
  lines.push(`X-Forwarded-For: ${forwardedFor ? `${forwardedFor}, ${peer}` : peer}`, `X-Fretcall-Forwarded: ${fromNode}`);
  return `${lines.join("\r\n")}\r\n\r\n`;
}

/**
 * Sends the upgrade to `address` (host:port) and, once the owner answers, pipes the client to it
 * and resolves true. Resolves false, with the client untouched, if the owner does not connect or
 * answer within `answerMs` (dead, or paused).
 */
export function pipeUpgrade(address: string, req: IncomingMessage, head: Buffer, client: Duplex, fromNode: string, answerMs = OWNER_ANSWER_MS): Promise<boolean> {
  const at = address.lastIndexOf(":");
  const host = address.slice(0, at).replace(/^\[|\]$/g, "");
  const port = Number(address.slice(at + 1));
  return new Promise((resolve) => {
    const owner: Socket = connect({ host, port });
    const giveUp = () => {
      clearTimeout(timer);
      owner.destroy();
      resolve(false);
    };
    const timer = setTimeout(giveUp, answerMs);
    owner.once("error", giveUp);
    owner.once("connect", () => {
      owner.write(forwardedHead(req, fromNode));
      if (head.length > 0) owner.write(head);
    });
    owner.once("data", (first: Buffer) => {
      clearTimeout(timer);
      owner.off("error", giveUp);
      if (client.destroyed) {
        owner.destroy();
        return resolve(true);
      }
      client.write(first);
      owner.pipe(client);
      client.pipe(owner);
      // Either side ending or failing ends both.
      const end = () => {
        owner.destroy();
        client.destroy();
      };
      owner.on("error", end).on("close", end);
      client.on("error", end).on("close", end);
      resolve(true);
    });
  });
}

/**
 * The upgrade hook of a cluster node (server/sockets.ts `divert`): true when the socket was handed
 * to the room's owner. False leaves it to this node: a room it holds or nobody holds, an old
 * client's `/ws`, an upgrade already forwarded, Redis unreachable (the hello then asks to retry),
 * or an owner that stopped answering and whose lease has lapsed meanwhile.
 */
export function divertToOwner(leases: Leases, roomIdOf: (code: string) => Promise<string | undefined>) {
  return async (req: IncomingMessage, socket: Duplex, head: Buffer): Promise<boolean> => {
    if (req.headers[FORWARDED_HEADER]) return false;
    const code = socketRoomOf(req.url ?? "");
    const roomId = code ? await roomIdOf(code) : undefined;
    if (!roomId || leases.holds(roomId)) return false;
    const owner = await ownerOf(leases, roomId);
    if (!owner) return false;
    if (await pipeUpgrade(owner.address, req, head, socket, leases.nodeId)) return true;
    // The owner is gone or paused: wait (at most a TTL) for its lease to lapse, then serve here.
    const until = Date.now() + leases.ttlMs + 500;
    while (Date.now() < until && !socket.destroyed) {
      const now = await ownerOf(leases, roomId);
      if (!now) return false;
      if (now.nodeId !== owner.nodeId || now.fence !== owner.fence) return pipeUpgrade(now.address, req, head, socket, leases.nodeId);
      await new Promise((r) => setTimeout(r, 250));
    }
    return false;
  };
}

/** Another node that holds the room's lease; null for nobody, this node, or an unreachable Redis. */
async function ownerOf(leases: Leases, roomId: string): Promise<LeaseOwner | null> {
  const owner = await leases.owner(roomId).catch(() => null);
  return owner && owner.nodeId !== leases.nodeId ? owner : null;
}
