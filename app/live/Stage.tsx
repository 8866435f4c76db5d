/**
 * The stage: the teacher's projected screen. Sized for the back of a classroom — the prompt
 * note takes at least a third of the screen height, numbers are 48 px or more.
 */
import { AnimatePresence, motion, useReducedMotion } from "framer-motion";
import { useEffect, useMemo, useState } from "react";
import { Link } from "react-router";
import { Fretboard } from "~/components/Fretboard";
import { Staff } from "~/components/Staff";
import { buttonClass } from "~/components/ui";
import { formatRoomCode } from "~/game/roomCode";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import { Countdown, MISTAKE_ICONS, Offline, StandingsBoard } from "./parts";
import { useRoomSocket } from "./useRoomSocket";

export interface StageProps {
  roomId: string;
  code: string;
  title: string;
  hostKey: string;
  joinUrl: string;
  qr: string;
  tuning: string;
  frets: number;
  position: number;
}

export function Stage(props: StageProps) {
  const { state, host, remove, toLocal } = useRoomSocket(props.code, { role: "host", hostKey: props.hostKey });
  const tuning = useMemo(() => resolveTuning(props.tuning), [props.tuning]);
  const phase = state.welcome?.phase ?? "lobby";
  const players = state.roster?.players ?? [];
  const shown = state.ended ? "ended" : state.reveal ? "reveal" : state.standings && !state.standings.final ? "standings" : state.prompt ? "prompt" : "lobby";

  return (
    <div className="space-y-4">
      <header className="flex flex-wrap items-center gap-4">
        <h1 className="font-display text-2xl font-semibold">{props.title}</h1>
        <span className="rounded-full bg-ink px-4 py-1 font-display text-2xl tracking-widest text-paper" aria-label={`Room code ${props.code.split("").join(" ")}`}>
          {formatRoomCode(props.code)}
        </span>
        <span className="text-lg text-ink-soft">
          {players.filter((p) => p.online).length} of {players.length} players online
        </span>
        <ConnectionBadge connection={state.connection} />
        <HostControls shown={shown} paused={state.paused} locked={state.roster?.locked ?? false} onAction={host} phase={phase} />
      </header>
      {state.error ? (
        <p role="alert" className="rounded-2xl border-2 border-brick bg-brick/10 p-3 text-lg">
          <span aria-hidden="true">✗ </span>
          {state.error}
        </p>
      ) : null}
      {state.closedReason ? <p className="text-xl text-brick">{state.closedReason}</p> : null}
      {state.paused ? <p className="rounded-2xl bg-sky/15 p-4 text-center font-display text-4xl">⏸ Paused</p> : null}

      {shown === "lobby" ? (
        <section className="grid gap-6 lg:grid-cols-[auto_1fr]">
          <div className="rounded-3xl bg-white p-6 text-center shadow">
            <p className="text-xl">Join at</p>
            <p className="font-display text-3xl font-semibold break-all">{props.joinUrl.replace(/\/join.*$/, "/join")}</p>
            <p className="mt-4 font-display text-[min(14vw,7rem)] leading-none font-semibold tracking-widest">{formatRoomCode(props.code)}</p>
            <div className="mx-auto mt-4 w-64" aria-label="QR code with the join link" role="img" dangerouslySetInnerHTML={{ __html: props.qr }} />
          </div>
          <div>
            <h2 className="font-display text-3xl font-semibold">Players ({players.length})</h2>
            <ul className="mt-4 flex flex-wrap gap-3" aria-live="polite">
              <AnimatePresence>
                {players.map((p) => (
                  <motion.li
                    key={p.playerId}
                    layout
                    initial={{ opacity: 0, scale: 0.8 }}
                    animate={{ opacity: 1, scale: 1 }}
                    exit={{ opacity: 0 }}
                    className="flex items-center gap-2 rounded-full bg-white px-4 py-2 text-2xl shadow-sm"
                  >
                    {p.nickname}
                    {p.online ? null : <Offline />}
                    <button
                      type="button"
                      onClick={() => confirm(`Remove ${p.nickname} from the room?`) && remove(p.playerId)}
                      className="ml-1 rounded-full px-2 text-base text-ink-soft hover:bg-brick/15"
                      aria-label={`Remove ${p.nickname}`}
                    >
                      ✕
                    </button>
                  </motion.li>
                ))}
              </AnimatePresence>
            </ul>
            {players.length === 0 ? <p className="mt-4 text-2xl text-ink-soft">Waiting for the class to join…</p> : null}
          </div>
        </section>
      ) : null}

      {(shown === "prompt" || shown === "reveal") && state.prompt ? (
        <section className="space-y-4">
          <div className="flex items-center justify-between font-display text-3xl">
            <span>
              Note {state.prompt.index + 1} of {state.prompt.total}
            </span>
            <span aria-live="polite" className="text-5xl font-semibold">
              {state.reveal ? `${state.reveal.answered}/${state.reveal.of}` : `${state.answered?.count ?? 0}/${state.answered?.of ?? players.length}`}{" "}
              <span className="text-2xl font-normal">answered</span>
            </span>
          </div>
          {shown === "prompt" ? <Countdown showAt={toLocal(state.prompt.showAt)} deadline={toLocal(state.prompt.deadline)} paused={state.paused} /> : null}
          <div data-written={state.prompt.written} className="flex min-h-[36vh] items-center justify-center rounded-3xl bg-white shadow">
            <Staff notes={[{ written: state.prompt.written, accidental: state.prompt.printedAccidental }]} keyFifths={state.prompt.keyFifths} size="stage" />
          </div>
          {state.progress ? (
            <div>
              <p className="font-display text-2xl">
                Spots found: {state.progress.found.length} of {state.progress.total}
              </p>
              <div className="mt-2 h-6 overflow-hidden rounded-full bg-ink/10" role="progressbar" aria-valuemin={0} aria-valuemax={state.progress.total} aria-valuenow={state.progress.found.length}>
                <div className="h-full bg-teal transition-all" style={{ width: `${(100 * state.progress.found.length) / Math.max(1, state.progress.total)}%` }} />
              </div>
            </div>
          ) : null}
          {state.reveal ? <Reveal reveal={state.reveal} tuning={tuning} frets={props.frets} position={props.position} /> : null}
        </section>
      ) : null}

      {shown === "standings" && state.standings ? <StandingsBoard standings={state.standings} big /> : null}

      {shown === "ended" && state.ended ? (
        <section className="space-y-6">
          <h2 className="font-display text-5xl font-semibold">Round complete{state.ended.tuneName ? ` — the tune was “${state.ended.tuneName}”` : ""}</h2>
          {state.standings ? <StandingsBoard standings={state.standings} big /> : null}
          <Link to={`/results/${props.roomId}`} className={buttonClass("teal", "text-2xl")}>
            See note-by-note results
          </Link>
        </section>
      ) : null}
    </div>
  );
}

function Reveal({ reveal, tuning, frets, position }: { reveal: NonNullable<ReturnType<typeof useRoomSocket>["state"]["reveal"]>; tuning: ReturnType<typeof resolveTuning>; frets: number; position: number }) {
  const reduce = useReducedMotion();
  const kinds = Object.entries(reveal.counts).filter(([, n]) => n > 0);
  return (
    <motion.div initial={reduce ? false : { opacity: 0, y: 12 }} animate={{ opacity: 1, y: 0 }} transition={{ duration: 0.25 }} className="space-y-4">
      <Fretboard
        tuning={tuning}
        frets={frets}
        position={position}
        highlights={[{ ...reveal.home, kind: "home" }, ...reveal.otherSpots.map((s) => ({ ...s, kind: "other" as const }))]}
        heat={reveal.heat}
      />
      <ul className="flex flex-wrap gap-3 text-2xl">
        {kinds.map(([kind, n]) => (
          <li key={kind} className={`rounded-2xl px-4 py-2 ${kind === "home-spot" ? "bg-teal text-white" : "bg-white"}`}>
            <span aria-hidden="true">{MISTAKE_ICONS[kind as keyof typeof MISTAKE_ICONS]} </span>
            {kind === "no-answer" ? "no answer" : MISTAKE_LABELS[kind as keyof typeof MISTAKE_LABELS]}: <strong>{n}</strong>
          </li>
        ))}
      </ul>
    </motion.div>
  );
}

function ConnectionBadge({ connection }: { connection: string }) {
  if (connection === "open") return null;
  return <span className="rounded-full bg-sky/20 px-3 py-1">⟳ {connection === "closed" ? "disconnected" : "connecting…"}</span>;
}

function HostControls({
  shown,
  phase,
  paused,
  locked,
  onAction,
}: {
  shown: string;
  phase: string;
  paused: boolean;
  locked: boolean;
  onAction: (a: "start" | "pause" | "resume" | "skip" | "next" | "end" | "lock" | "unlock") => void;
}) {
  const [confirmEnd, setConfirmEnd] = useState(false);
  useEffect(() => setConfirmEnd(false), [shown]);
  if (shown === "ended") return null;
  return (
    <div className="ml-auto flex flex-wrap gap-2">
      {shown === "lobby" && phase === "lobby" ? (
        <>
          <button className={buttonClass("ghost")} onClick={() => onAction(locked ? "unlock" : "lock")}>
            {locked ? "🔒 Locked — unlock" : "🔓 Lock room"}
          </button>
          <button className={buttonClass("teal", "text-xl")} onClick={() => onAction("start")}>
            ▶ Start
          </button>
        </>
      ) : (
        <>
          <button className={buttonClass("ghost")} onClick={() => onAction(paused ? "resume" : "pause")}>
            {paused ? "▶ Resume" : "⏸ Pause"}
          </button>
          {shown === "prompt" ? (
            <button className={buttonClass("ghost")} onClick={() => onAction("skip")}>
              ⏭ Skip
            </button>
          ) : null}
          {shown === "reveal" || shown === "standings" ? (
            <button className={buttonClass("teal", "text-xl")} onClick={() => onAction("next")}>
              Next ▶
            </button>
          ) : null}
        </>
      )}
      <button className={buttonClass(confirmEnd ? "brick" : "ghost")} onClick={() => (confirmEnd ? onAction("end") : setConfirmEnd(true))}>
        {confirmEnd ? "Really end?" : "■ End"}
      </button>
    </div>
  );
}
