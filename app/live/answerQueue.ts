/**
 * The pad's taps and where each stands with the server. A tap is never shown as counted before
 * the server's ack: it waits while the socket is down, goes out once the pad has its seat back,
 * is sent again when its connection dropped before the reply (the server stores it once and
 * answers a repeat with the same ack), and ends counted or refused with the server's reason.
 */
import { ANSWER_RESEND_CODES, ERROR_CODES, type ErrorCode, type ServerMessage } from "~/game/messages";
import type { Spot } from "~/music/fretboard";

type Ack = Extract<ServerMessage, { type: "answer-ack" }>;
export type AcceptedAck = Extract<Ack, { accepted: true }>;

export interface Tap {
  promptId: string;
  spot: Spot;
  /** Pad time of the tap: sent as `tapAt` however late the answer goes out. */
  tapAt: number;
  /**
   * unsent: waiting for an open socket with its seat; sent: on the wire, no reply yet; held: the
   * server said "not now" (paused, not showing yet) and it goes again once the prompt is open;
   * counted and refused: the server's reply.
   */
  status: "unsent" | "sent" | "held" | "counted" | "refused";
  ack?: AcceptedAck;
  refusal?: { code: ErrorCode; reason: string };
}

export const settled = (t: Tap) => t.status === "counted" || t.status === "refused";

/** A new tap waits to be sent; settled taps of other prompts make way (their verdict has been shown). */
export function addTap(taps: readonly Tap[], tap: Pick<Tap, "promptId" | "spot" | "tapAt">): Tap[] {
  return [...taps.filter((t) => t.promptId === tap.promptId || !settled(t)), { ...tap, status: "unsent" }];
}

/** The taps to send now, in the order tapped: every unsent one, and held ones whose prompt is open again. */
export function dueTaps(taps: readonly Tap[], isOpen: (promptId: string) => boolean): Tap[] {
  return taps.filter((t) => t.status === "unsent" || (t.status === "held" && isOpen(t.promptId)));
}

export const markSent = (taps: readonly Tap[], sent: readonly Tap[]): Tap[] => taps.map((t) => (sent.includes(t) ? { ...t, status: "sent" } : t));

/**
 * The server's reply, matched to the oldest tap on the wire for that prompt (one socket's replies
 * come in the order it sent). An accepted ack with no tap waiting for it (the catch-up after a
 * reconnect repeats the acks of the prompt on screen) changes nothing.
 */
export function applyAck(taps: readonly Tap[], ack: Ack): Tap[] {
  const i = taps.findIndex((t) => t.status === "sent" && t.promptId === ack.promptId);
  if (i < 0) return [...taps];
  const next = [...taps];
  const tap = taps[i]!;
  if (ack.accepted) next[i] = { ...tap, status: "counted", ack };
  // `stopping` waits for the next connection; `paused` and `not-open` for the prompt to open.
  else if (ANSWER_RESEND_CODES.includes(ack.code)) next[i] = { ...tap, status: ack.code === ERROR_CODES.stopping ? "unsent" : "held" };
  else next[i] = { ...tap, status: "refused", refusal: { code: ack.code, reason: ack.message } };
  return next;
}

/** The socket closed: whatever had no reply goes again after the reconnect. */
export const connectionLost = (taps: readonly Tap[]): Tap[] => taps.map((t) => (t.status === "sent" ? { ...t, status: "unsent" } : t));

/** The seat is gone (removed, or the room forgot it): taps still waiting can never be counted. */
export const seatLost = (taps: readonly Tap[], reason: string): Tap[] =>
  taps.map((t) => (settled(t) ? t : { ...t, status: "refused", refusal: { code: ERROR_CODES.unknownPlayer, reason } }));
