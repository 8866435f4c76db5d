/**
 * The browser side of the room protocol (docs/protocol.md): one WebSocket for a stage or a pad,
 * clock sync by ping bursts, reconnect with back-off, and the seat token kept so a phone that
 * slept or lost Wi-Fi takes its own seat back. The room's phase comes with the messages that change
 * it, so the stage and the pad show the screen the server is on, reloaded or not. A pad's taps wait
 * out a lost connection and go once the seat is back (./answerQueue.ts).
 */
import { useCallback, useEffect, useReducer, useRef } from "react";
import { addSample, emptyClock, estimate, type ClockState } from "~/game/clock";
import {
  CLOSE_CODES,
  PING_BURST,
  PING_BURST_GAP_MS,
  PING_INTERVAL_MS,
  PROTOCOL_VERSION,
  readServerMessage,
  reconnectDelayMs,
  type HostAction,
  type Pausable,
  type Phase,
  type ServerMessage,
  type ServerMessageOf,
} from "~/game/messages";
import { deviceNaming } from "~/components/NoteNaming";
import type { Spot } from "~/music/fretboard";
import { addTap, applyAck, connectionLost, dueTaps, markSent, seatLost, type Tap } from "./answerQueue";
import { holdRoomSocket, roomSocket } from "./roomSocket";

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
  /** The prompt's note: the stage's with the prompt (shown from showAt), a pad's from showAt. */
  note: ServerMessageOf<"note"> | null;
  answered: ServerMessageOf<"answered"> | null;
  /** The last accepted ack for the prompt on screen (also from the catch-up after a reload). */
  ack: Extract<ServerMessage, { type: "answer-ack"; accepted: true }> | null;
  /** This pad's taps and where each stands with the server. */
  taps: Tap[];
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
  note: null,
  answered: null,
  ack: null,
  taps: [],
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
  | { type: "offset"; offsetMs: number }
  | { type: "taps"; taps: Tap[] };

function view(state: LiveView, action: Action): LiveView {
  if (action.type === "connection") {
    // After `ended` the server closes every socket as "room gone": that is the normal finish, not news to show.
    const reason = state.ended ? null : (action.reason ?? state.closedReason);
    return { ...state, connection: action.connection, closedReason: reason };
  }
  if (action.type === "offset") return { ...state, offsetMs: action.offsetMs };
  if (action.type === "taps") return { ...state, taps: action.taps };
  const m = action.message;
  const next = content(state, m);
  return "phase" in m ? { ...next, phase: m.phase } : next;
}

/** What a message brings besides the phase. */
function content(state: LiveView, m: ServerMessage): LiveView {
  switch (m.type) {
    case "welcome":
      // The screen's messages follow: nothing from before the (re)connect is kept.
      // Taps are the pad's own: they outlive the connection.
      return { ...initial, connection: state.connection, closedReason: state.closedReason, offsetMs: state.offsetMs, roster: state.roster, taps: state.taps, welcome: m, pausedFrom: m.pausedFrom };
    case "roster":
      return { ...state, roster: m };
    case "prompt":
      // A new prompt clears what belonged to the last one.
      return m.promptId === state.prompt?.promptId
        ? { ...state, prompt: m }
        : { ...state, prompt: m, note: null, ack: null, reveal: null, answered: null, progress: null, standings: null };
    case "note":
      return { ...state, note: m };
    case "answered":
      return { ...state, answered: m };
    case "answer-ack":
      // A refusal belongs to its tap (see taps); an ack repeated for an earlier prompt is not this one's.
      return m.accepted && m.promptId === state.prompt?.promptId ? { ...state, ack: m, error: null } : state;
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
  // The hub says which in the close reason (docs/protocol.md): see below for a code with no room at all.
  [CLOSE_CODES.roomGone]: "This round is over: the room has ended.",
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
  const taps = useRef<Tap[]>([]);
  /** The socket has its seat back and its catch-up is in: taps may go. */
  const seated = useRef(false);
  const latest = useRef<{ prompt: ServerMessageOf<"prompt"> | null; phase: Phase | null }>({ prompt: null, phase: null });

  const setTaps = useCallback((next: Tap[]) => {
    taps.current = next;
    dispatch({ type: "taps", taps: next });
  }, []);
  /** Sends what is due: unsent taps, and held ones once their prompt is open (server time, as best known). */
  const flush = useCallback(() => {
    const socket = ws.current;
    if (!seated.current || socket?.readyState !== WebSocket.OPEN) return;
    const { prompt, phase } = latest.current;
    const open = (promptId: string) => phase === "prompt" && prompt?.promptId === promptId && Date.now() + offset.current >= prompt.showAt;
    const due = dueTaps(taps.current, open);
    if (due.length === 0) return;
    const naming = deviceNaming() ?? undefined;
    for (const t of due) socket.send(JSON.stringify({ type: "answer", promptId: t.promptId, spot: t.spot, tapAt: t.tapAt, naming }));
    setTaps(markSent(taps.current, due));
  }, [setTaps]);

  useEffect(() => {
    if (settled) return;
    const release = holdRoomSocket(code);
    let stopped = false;
    let retry = 0;
    let timers: number[] = [];
    let last: { t0: number; t3: number } | undefined;
    // Between a welcome with a seat and the roster that ends its catch-up.
    let catchingUp = false;

    const ping = () => {
      if (ws.current?.readyState !== WebSocket.OPEN) return;
      ws.current.send(JSON.stringify({ type: "ping", t0: Date.now(), ...(last ? { last } : {}) }));
    };

    const connect = () => {
      const socket = roomSocket(code, retry === 0);
      ws.current = socket;
      dispatch({ type: "connection", connection: retry === 0 ? "connecting" : "retrying" });
      const opened = () => {
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
        // Held taps are tried again on the same beat, in case the prompt opened later than expected.
        timers.push(
          window.setInterval(() => {
            ping();
            flush();
          }, PING_INTERVAL_MS),
        );
      };
      socket.onopen = opened;
      socket.onmessage = (event) => {
        const t3 = Date.now();
        const m = readServerMessage(String(event.data));
        if (!m) return;
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
        // The server is stopping: new taps wait for the next connection.
        if (m.type === "error" && m.code === "stopping") seated.current = false;
        if (m.type === "prompt") latest.current.prompt = m;
        if ("phase" in m) latest.current.phase = m.phase;
        dispatch({ type: "message", message: m });
        if (m.type === "welcome") {
          catchingUp = m.you !== null;
          if (!m.you && taps.current.length > 0) setTaps(seatLost(taps.current, "Your seat was lost before this tap reached the server. Join again."));
        }
        // A seated pad's catch-up (the prompt and its own acks) ends with the roster: taps still
        // waiting go after it, so an ack in the catch-up is never taken for their reply.
        if (m.type === "roster" && catchingUp) {
          catchingUp = false;
          seated.current = true;
          flush();
        }
        if (m.type === "answer-ack") setTaps(applyAck(taps.current, m));
        if (m.type === "prompt" && m.phase === "prompt") timers.push(window.setTimeout(flush, Math.max(0, m.showAt - offset.current - Date.now()) + 20));
      };
      socket.onclose = (event) => {
        for (const t of timers) window.clearTimeout(t);
        timers = [];
        seated.current = false;
        catchingUp = false;
        if (stopped) return;
        const final =
          event.code === CLOSE_CODES.roomGone && event.reason === "no such room" ? "No open room has that code. Check the code on the class screen." : FINAL_CLOSES[event.code];
        setTaps(final ? seatLost(taps.current, final) : connectionLost(taps.current));
        if (final) {
          if (event.code === CLOSE_CODES.removed) localStorage.removeItem(seatTokenKey(code));
          dispatch({ type: "connection", connection: "closed", reason: final });
          return;
        }
        retry += 1;
        dispatch({ type: "connection", connection: "retrying" });
        timers.push(window.setTimeout(connect, reconnectDelayMs(retry, event.code, Math.random())));
      };
      // An early socket may have opened before it had a handler.
      if (socket.readyState === WebSocket.OPEN) opened();
    };

    connect();
    const wake = () => {
      if (document.visibilityState === "visible" && ws.current?.readyState === WebSocket.CLOSED && !stopped) connect();
    };
    document.addEventListener("visibilitychange", wake);
    return () => {
      stopped = true;
      release();
      document.removeEventListener("visibilitychange", wake);
      for (const t of timers) window.clearTimeout(t);
      ws.current?.close(1000);
    };
  }, [code, flush, setTaps]);

  const sendRaw = useCallback((message: object) => {
    if (ws.current?.readyState === WebSocket.OPEN) ws.current.send(JSON.stringify(message));
  }, []);

  return {
    state,
    /** Local time of a server timestamp. */
    toLocal: (serverTime: number) => serverTime - state.offsetMs,
    join: (nickname: string) => sendRaw({ type: "join", room: code, nickname }),
    /** Queued at once with its tap time; sent now if the socket is open and seated, else once it is. */
    answer: (promptId: string, spot: Spot) => {
      setTaps(addTap(taps.current, { promptId, spot, tapAt: Date.now() }));
      flush();
    },
    host: (action: HostAction) => sendRaw({ type: "host", action }),
    remove: (playerId: string) => sendRaw({ type: "remove", playerId }),
  };
}
