/**
 * The browser side of the room protocol (docs/protocol.md): one WebSocket for a stage or a pad,
 * clock sync by ping bursts, reconnect with back-off, and the seat token kept so a phone that
 * slept or lost Wi-Fi takes its own seat back. The room's phase comes with the messages that change
 * it, so the stage and the pad show the screen the server is on, reloaded or not.
 */
import { useCallback, useEffect, useReducer, useRef } from "react";
import { addSample, emptyClock, estimate, type ClockState } from "~/game/clock";
import {
  CLOSE_CODES,
  parseServerMessage,
  PING_BURST,
  PING_BURST_GAP_MS,
  PING_INTERVAL_MS,
  PROTOCOL_VERSION,
  reconnectDelayMs,
  type HostAction,
  type Pausable,
  type Phase,
  type ServerMessage,
  type ServerMessageOf,
} from "~/game/protocol";
import type { Spot } from "~/music/fretboard";

export type Who = { role: "host"; hostKey: string } | { role: "player" };

export interface LiveView {
  connection: "connecting" | "open" | "retrying" | "closed";
  /** Why the server closed us for good, in words for the screen. */
  closedReason: string | null;
  welcome: ServerMessageOf<"welcome"> | null;
  /** The room's phase as the server last said; null until the first welcome. */
  phase: Phase | null;
  /** While paused: the phase whose screen stays up, and when the round paused (server time). */
  pausedFrom: Pausable | null;
  pausedAt: number | null;
  roster: ServerMessageOf<"roster"> | null;
  prompt: ServerMessageOf<"prompt"> | null;
  answered: ServerMessageOf<"answered"> | null;
  ack: Extract<ServerMessage, { type: "answer-ack"; accepted: true }> | null;
  progress: ServerMessageOf<"progress"> | null;
  reveal: ServerMessageOf<"reveal"> | null;
  standings: ServerMessageOf<"standings"> | null;
  ended: ServerMessageOf<"ended"> | null;
  error: string | null;
  /** Server time − local time, once measured. */
  offsetMs: number;
}

const initial: LiveView = {
  connection: "connecting",
  closedReason: null,
  welcome: null,
  phase: null,
  pausedFrom: null,
  pausedAt: null,
  roster: null,
  prompt: null,
  answered: null,
  ack: null,
  progress: null,
  reveal: null,
  standings: null,
  ended: null,
  error: null,
  offsetMs: 0,
};

type Action =
  | { type: "message"; message: ServerMessage }
  | { type: "connection"; connection: LiveView["connection"]; reason?: string }
  | { type: "offset"; offsetMs: number };

function view(state: LiveView, action: Action): LiveView {
  if (action.type === "connection") {
    // After `ended` the server closes every socket as "room gone": that is the normal finish, not news to show.
    const reason = state.ended ? null : (action.reason ?? state.closedReason);
    return { ...state, connection: action.connection, closedReason: reason };
  }
  if (action.type === "offset") return { ...state, offsetMs: action.offsetMs };
  const m = action.message;
  const next = content(state, m);
  return "phase" in m ? { ...next, phase: m.phase } : next;
}

/** What a message brings besides the phase. */
function content(state: LiveView, m: ServerMessage): LiveView {
  switch (m.type) {
    case "welcome":
      // The screen's messages follow: nothing from before the (re)connect is kept.
      return { ...initial, connection: state.connection, closedReason: state.closedReason, offsetMs: state.offsetMs, roster: state.roster, welcome: m, pausedFrom: m.pausedFrom };
    case "roster":
      return { ...state, roster: m };
    case "prompt":
      // A new prompt clears what belonged to the last one.
      return m.promptId === state.prompt?.promptId
        ? { ...state, prompt: m }
        : { ...state, prompt: m, ack: null, reveal: null, answered: null, progress: null, standings: null };
    case "answered":
      return { ...state, answered: m };
    case "answer-ack":
      return m.accepted ? { ...state, ack: m, error: null } : { ...state, error: m.message };
    case "progress":
      return { ...state, progress: m };
    case "reveal":
      return { ...state, reveal: m };
    case "standings":
      // Standings replace the reveal on screen.
      return { ...state, standings: m, reveal: null };
    case "paused":
      return { ...state, pausedFrom: m.pausedFrom, pausedAt: m.at };
    case "resumed":
      return { ...state, pausedFrom: null, pausedAt: null };
    case "ended":
      return { ...state, ended: m };
    case "error":
      return { ...state, error: m.message };
    case "pong":
      return state;
  }
}

/** The screen to show: the phase's own, or while paused the one it paused on (under a pause notice). Null before the first welcome. */
export const screenOf = (view: LiveView): Exclude<Phase, "paused"> | null => (view.phase === "paused" ? view.pausedFrom : view.phase);

const FINAL_CLOSES: Record<number, string> = {
  [CLOSE_CODES.badVersion]: "This page is out of date. Reload it.",
  [CLOSE_CODES.unauthorised]: "This stage is not allowed to run the room.",
  [CLOSE_CODES.removed]: "The teacher removed you from this room.",
  [CLOSE_CODES.roomGone]: "This room has ended or doesn't exist.",
  [CLOSE_CODES.replaced]: "This seat is now open on another screen.",
};

/** Where a pad keeps its seat token (the key predates the name; changing it would lose seats). */
export const seatTokenKey = (code: string) => `fretcall-seat-${code}`;

/** `settled`: the messages of a room that has ended, shown as they are, with no socket. */
export function useRoomSocket(code: string, who: Who, settled: ServerMessage[] | null = null) {
  const [state, dispatch] = useReducer(view, settled, (messages) =>
    (messages ?? []).reduce<LiveView>((s, message) => view(s, { type: "message", message }), messages ? { ...initial, connection: "closed" } : initial),
  );
  const ws = useRef<WebSocket | null>(null);
  const clock = useRef<ClockState>(emptyClock());
  const offset = useRef(0);
  const whoRef = useRef(who);
  whoRef.current = who;

  useEffect(() => {
    if (settled) return;
    let stopped = false;
    let retry = 0;
    let timers: number[] = [];
    let last: { t0: number; t3: number } | undefined;

    const ping = () => {
      if (ws.current?.readyState !== WebSocket.OPEN) return;
      ws.current.send(JSON.stringify({ type: "ping", t0: Date.now(), ...(last ? { last } : {}) }));
    };

    const connect = () => {
      const socket = new WebSocket(`${location.protocol === "https:" ? "wss" : "ws"}://${location.host}/ws`);
      ws.current = socket;
      dispatch({ type: "connection", connection: retry === 0 ? "connecting" : "retrying" });
      socket.onopen = () => {
        retry = 0;
        dispatch({ type: "connection", connection: "open" });
        const w = whoRef.current;
        const seatToken = w.role === "player" ? (localStorage.getItem(seatTokenKey(code)) ?? undefined) : undefined;
        socket.send(
          JSON.stringify(
            w.role === "host"
              ? { type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: code, hostKey: w.hostKey }
              : { type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code, ...(seatToken ? { seatToken } : {}) },
          ),
        );
        for (let i = 0; i < PING_BURST; i++) timers.push(window.setTimeout(ping, i * PING_BURST_GAP_MS));
        timers.push(window.setInterval(ping, PING_INTERVAL_MS));
      };
      socket.onmessage = (event) => {
        const t3 = Date.now();
        const parsed = parseServerMessage(String(event.data));
        if (!parsed.ok) return;
        const m = parsed.message;
        if (m.type === "pong") {
          last = { t0: m.t0, t3 };
          clock.current = addSample(clock.current, { ...m, t3 });
          const est = estimate(clock.current);
          if (est && Math.abs(est.offsetMs - offset.current) >= 1) {
            offset.current = est.offsetMs;
            dispatch({ type: "offset", offsetMs: est.offsetMs });
          }
          return;
        }
        if (m.type === "welcome" && m.you) localStorage.setItem(seatTokenKey(code), m.you.seatToken);
        if (m.type === "error" && m.code === "unknown-player") localStorage.removeItem(seatTokenKey(code));
        dispatch({ type: "message", message: m });
      };
      socket.onclose = (event) => {
        for (const t of timers) window.clearTimeout(t);
        timers = [];
        if (stopped) return;
        const final = FINAL_CLOSES[event.code];
        if (final) {
          if (event.code === CLOSE_CODES.removed) localStorage.removeItem(seatTokenKey(code));
          dispatch({ type: "connection", connection: "closed", reason: final });
          return;
        }
        retry += 1;
        dispatch({ type: "connection", connection: "retrying" });
        timers.push(window.setTimeout(connect, reconnectDelayMs(retry, event.code, Math.random())));
      };
    };

    connect();
    const wake = () => {
      if (document.visibilityState === "visible" && ws.current?.readyState === WebSocket.CLOSED && !stopped) connect();
    };
    document.addEventListener("visibilitychange", wake);
    return () => {
      stopped = true;
      document.removeEventListener("visibilitychange", wake);
      for (const t of timers) window.clearTimeout(t);
      ws.current?.close(1000);
    };
  }, [code]);

  const sendRaw = useCallback((message: object) => {
    if (ws.current?.readyState === WebSocket.OPEN) ws.current.send(JSON.stringify(message));
  }, []);

  return {
    state,
    /** Local time of a server timestamp. */
    toLocal: (serverTime: number) => serverTime - state.offsetMs,
    join: (nickname: string) => sendRaw({ type: "join", room: code, nickname }),
    answer: (promptId: string, spot: Spot) => sendRaw({ type: "answer", promptId, spot, tapAt: Date.now() }),
    host: (action: HostAction) => sendRaw({ type: "host", action }),
    remove: (playerId: string) => sendRaw({ type: "remove", playerId }),
  };
}
