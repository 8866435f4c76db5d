// Limits on live-round connections and seats (app/auth/rate-limit.server.ts holds the numbers).
import { randomUUID } from "node:crypto";
import type { WebSocket } from "ws";
import { firstRefusal, take, type Limits, type Refusal } from "~/auth/rate-limit.server";

const sockets = new WeakMap<WebSocket, { id: string; address: string; limits: Limits }>();

/** Counts a new WebSocket connection against its address. */
export const admitSocket = (limits: Limits, address: string) => take(limits.sockets, address);

/** Remembers whose a connection is, for the seat limits of its joins. */
export function rememberSocket(ws: WebSocket, limits: Limits, address: string) {
  sockets.set(ws, { id: randomUUID(), address, limits });
}

/** Counts a join (a new seat) against its connection and address; the refusal when over either. */
export async function seatRefusal(ws: WebSocket): Promise<Refusal | undefined> {
  const known = sockets.get(ws);
  if (!known) return undefined;
  return firstRefusal([take(known.limits.seats.socket, known.id), take(known.limits.seats.address, known.address)]);
}
