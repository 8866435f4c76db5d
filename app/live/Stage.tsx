/**
 * The stage: the teacher's projected screen. Sized for the back of a classroom — the prompt
 * note takes well over a third of the screen height, numbers are 48 px or more.
 */
import { AnimatePresence, motion, useReducedMotion } from "framer-motion";
import { useEffect, useMemo, useRef, useState } from "react";
import { Link } from "react-router";
import { Fretboard } from "~/components/Fretboard";
import { playSounding, soundUnlocked, unlockSound } from "~/components/sound";
import { SoundControl } from "~/components/SoundControl";
import { Staff } from "~/components/Staff";
import { useWidth } from "~/components/TuneStaff";
import { buttonClass } from "~/components/ui";
import type { Phase, ServerMessage } from "~/game/messages";
import { formatRoomCode } from "~/game/roomCode";
import { soundingMidi } from "~/music/fretboard";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { parsePitch, pitchMidi } from "~/music/pitch";
import { noteName } from "~/review/format";
import { useNoteNaming } from "~/components/NoteNaming";
import { resolveTuning } from "~/music/tuning";
import { Countdown, FindEvery, Icon, MISTAKE_ICONS, Offline, SecondsLeft, StandingsBoard, TeamName, usePreviousOrder, useReached } from "./parts";
import { MelodySoFar, OffScreenUntil } from "./StageNote";
import { screenOf, useRoomSocket } from "./useRoomSocket";
export interface StageProps {
  roomId: string;
  code: string;
  title: string;
  hostKey: string;
  joinUrl: string;
  /** Which address the join link and QR code hold, in words. */
  joinNote: string;
  /** False when the only address is localhost, which no phone can reach. */
  joinReachable: boolean;
  qr: string;
  tuning: string;
  frets: number;
  position: number;
  /** An ended room's last screen, from its log (there is no live room left to connect to). */
  finalScreen: ServerMessage[] | null;
}

export function Stage(props: StageProps) {
  const { state, host, remove, toLocal } = useRoomSocket(props.code, { role: "host", hostKey: props.hostKey }, props.finalScreen);
  const tuning = useMemo(() => resolveTuning(props.tuning), [props.tuning]);
  const root = useRef<HTMLDivElement>(null);
  const players = state.roster?.players ?? [];
  const screen = screenOf(state);
  const paused = state.phase === "paused";
  const frozenAt = state.pausedAt === null ? null : toLocal(state.pausedAt);
  const reveal = screen === "reveal" ? state.reveal : null;
  const previousOrder = usePreviousOrder(state.standings);
  const offline = new Set(players.filter((p) => !p.online).map((p) => p.playerId));
  // The stage has the note from the prompt on and shows it from showAt (local time); a paused prompt hides it until the new showAt.
  const note = state.note && state.note.promptId === state.prompt?.promptId ? state.note : null;
  const noteAt = !note ? null : screen === "reveal" ? 0 : screen === "prompt" && !paused && state.prompt ? toLocal(state.prompt.showAt) : null;
  const shown = useReached(noteAt) ? note : null;
  const [noteBox, noteWidth] = useWidth();

  // The tune engraver (and its music font) loads in the lobby, so a Tune walk's first note is drawn the moment it shows.
  useEffect(() => {
    import("~/components/tuneRender").catch(() => undefined);
  }, []);

  // The reveal sounds the note the class just read; the teacher's clicks on this page are the gesture that allows it.
  const revealed = state.reveal?.written;
  useEffect(() => {
    if (revealed && soundUnlocked()) void playSounding(soundingMidi(pitchMidi(parsePitch(revealed))));
  }, [revealed, state.reveal?.promptId]);

  return (
    <div ref={root} onPointerDown={unlockSound} onKeyDown={unlockSound} className="space-y-4 bg-paper [&:fullscreen]:overflow-y-auto [&:fullscreen]:p-6">
      <header className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <h1 className="font-display text-2xl font-semibold">{props.title}</h1>
        <span className="rounded-full bg-ink px-4 py-1 font-display text-3xl tracking-widest text-paper" aria-label={`Room code ${props.code.split("").join(" ")}`}>
          {formatRoomCode(props.code)}
        </span>
        <span className="text-xl text-ink-soft">
          {players.filter((p) => p.online).length} of {players.length} online
        </span>
        {screen === "ended" ? null : <ConnectionBadge connection={state.connection} />}
        <div className="ml-auto flex flex-wrap items-center gap-2">
          {/* The lobby has the full sound control; during the round the mute alone is enough. */}
          {screen === "lobby" ? null : <SoundControl compact />}
          <FullScreenButton target={root} />
          {screen ? <HostControls screen={screen} paused={paused} locked={state.roster?.locked ?? false} onAction={host} /> : null}
        </div>
      </header>
      {[state.closedReason, state.error].filter(Boolean).map((problem) => (
        <p key={problem} role="alert" className="rounded-2xl border-2 border-brick bg-brick/10 p-3 text-2xl">
          <span aria-hidden="true">✗ </span>
          {problem}
        </p>
      ))}
      {paused ? (
        <p className="flex items-center justify-center gap-3 rounded-2xl bg-sky/15 p-4 font-display text-5xl">
          <Icon name="pause" /> Paused
        </p>
      ) : null}

      {screen === "lobby" ? (
        <section className="grid gap-6 lg:grid-cols-[auto_1fr]">
          <div className="rounded-3xl bg-white p-6 text-center shadow">
            <p className="text-2xl">Join at</p>
            <p className="font-display text-4xl font-semibold break-all">{props.joinUrl.replace(/\/join.*$/, "/join")}</p>
            <p className="mt-2 text-2xl">with the room code</p>
            <p className="font-display text-[min(14vw,8rem)] leading-none font-semibold tracking-widest">{formatRoomCode(props.code)}</p>
            <div className="mx-auto mt-4 w-[min(18rem,30vh)]" aria-label="QR code with the join link" role="img" dangerouslySetInnerHTML={{ __html: props.qr }} />
            <p className={`mx-auto mt-2 max-w-[22rem] ${props.joinReachable ? "text-ink-soft" : "rounded-xl bg-brick/10 p-2 text-lg"}`} data-testid="join-note">
              {props.joinNote}
            </p>
          </div>
          <div className="space-y-4">
            <div className="flex flex-wrap items-center gap-3">
              <h2 className="font-display text-5xl font-semibold">Players ({players.length})</h2>
              {/* Seats of phones that left: they would hold places in the room and crowd the standings. */}
              {players.some((p) => !p.online) ? (
                <button className={buttonClass("ghost", "ml-auto")} onClick={() => host("clear-offline")}>
                  Clear offline players ({players.filter((p) => !p.online).length})
                </button>
              ) : null}
            </div>
            {/* In a Teams round the lobby shows who is on which team, each under its name and mark. */}
            {teamsOf(players).map(({ team, members }) => (
              <div key={team ?? "all"} className="space-y-2">
                {team === null ? null : (
                  <h3 className="font-display text-3xl font-semibold">
                    <TeamName team={team} /> ({members.length})
                  </h3>
                )}
                <ul className="flex flex-wrap gap-3" aria-live="polite">
                  <AnimatePresence>
                    {members.map((p) => (
                      <PlayerChip key={p.playerId} player={p} onRemove={remove} />
                    ))}
                  </AnimatePresence>
                </ul>
              </div>
            ))}
            {players.length === 0 ? <p className="text-3xl text-ink-soft">Waiting for the class to join…</p> : null}
            <div className="rounded-2xl bg-white/70 p-4">
              <SoundControl />
              <p className="mt-2 text-ink-soft">The stage plays each note at its reveal once you have clicked anywhere on this page.</p>
            </div>
          </div>
        </section>
      ) : null}

      {(screen === "prompt" || screen === "reveal") && state.prompt ? (
        <section className="space-y-4">
          {screen === "prompt" ? <Countdown showAt={toLocal(state.prompt.showAt)} deadline={toLocal(state.prompt.deadline)} frozenAt={frozenAt} /> : null}
          {/* At the reveal the note and its figures shrink (numbers still 48 px) and the class's answers join them in the
              top row, so the whole neck with its key fits a 1366×768 projector below. */}
          <div className={`grid gap-4 ${reveal ? "lg:grid-cols-[minmax(0,1fr)_auto_auto]" : "lg:grid-cols-[minmax(0,1fr)_22rem]"}`}>
            {/* Until the note shows, the staff holds the key signature alone: no note on the page, drawn or named. */}
            <div ref={noteBox} data-written={shown?.written} className="relative flex items-center justify-center rounded-3xl bg-white px-4 shadow">
              <Staff notes={[]} keyFifths={note?.keyFifths ?? 0} size={reveal ? "reveal" : "stage"} className={`w-full ${shown ? "invisible" : ""}`} />
              {shown || paused ? null : <p className="absolute inset-x-0 top-3 text-center font-display text-4xl text-ink-soft">Get ready…</p>}
              {note ? (
                <OffScreenUntil at={noteAt}>
                  {note.melody ? (
                    // Laid out for the box it will move into (the same padding): off-screen it has no width of its own.
                    <MelodySoFar melody={note.melody} reveal={reveal !== null} width={noteWidth} />
                  ) : (
                    <Staff notes={[{ written: note.written, accidental: note.printedAccidental }]} keyFifths={note.keyFifths} size={reveal ? "reveal" : "stage"} className="w-full" />
                  )}
                </OffScreenUntil>
              ) : null}
            </div>
            <aside className={`flex flex-col justify-center font-display ${reveal ? "gap-2" : "gap-4"}`}>
              <p className="leading-none">
                <span className="text-3xl">Note </span>
                <span className={`${reveal ? "text-5xl" : "text-7xl"} font-semibold tabular-nums`}>{state.prompt.index + 1}</span>
                <span className="text-3xl"> of {state.prompt.total}</span>
              </p>
              <p aria-live="polite" className="leading-none">
                <span className={`${reveal ? "text-5xl" : "text-7xl"} font-semibold tabular-nums`}>
                  {reveal ? `${reveal.answered}/${reveal.of}` : `${state.answered?.count ?? 0}/${state.answered?.of ?? players.length}`}
                </span>{" "}
                <span className="text-3xl">answered</span>
              </p>
              <OfflineCount count={reveal ? reveal.offline : (state.answered?.offline ?? 0)} />
              {screen === "prompt" ? <SecondsLeft showAt={toLocal(state.prompt.showAt)} deadline={toLocal(state.prompt.deadline)} frozenAt={frozenAt} /> : null}
              {reveal ? <HomeSpotWords reveal={reveal} /> : null}
            </aside>
            {reveal ? <AnswerCounts counts={reveal.counts} /> : null}
          </div>
          {state.prompt.mode === "full-neck" ? (
            <p className="font-display text-4xl">
              <FindEvery spots={shown?.spotsToFind ?? null} />
            </p>
          ) : null}
          {/* Full neck's count of spots narrows down the note: it shows with the note. */}
          {shown && state.progress ? (
            <div>
              <p className="font-display text-4xl">
                Spots found: {state.progress.found.length} of {state.progress.total}
              </p>
              <div
                className="mt-2 h-6 overflow-hidden rounded-full bg-ink/10"
                role="progressbar"
                aria-label="Spots found"
                aria-valuemin={0}
                aria-valuemax={state.progress.total}
                aria-valuenow={state.progress.found.length}
              >
                <div className="h-full bg-teal transition-all" style={{ width: `${(100 * state.progress.found.length) / Math.max(1, state.progress.total)}%` }} />
              </div>
            </div>
          ) : null}
          {reveal ? <Reveal reveal={reveal} tuning={tuning} frets={props.frets} position={props.position} /> : null}
        </section>
      ) : null}

      {screen === "standings" && state.standings ? <StandingsBoard standings={state.standings} previousOrder={previousOrder} offline={offline} big /> : null}

      {screen === "ended" && state.ended ? (
        <section className="space-y-6">
          <h2 className="font-display text-5xl font-semibold">Round complete{state.ended.tuneName ? ` — the tune was “${state.ended.tuneName}”` : ""}</h2>
          {state.ended.reason === "idle" ? (
            <p className="text-2xl text-ink-soft">This room ended by itself after hours without play. Its results are kept.</p>
          ) : null}
          {state.standings ? <StandingsBoard standings={state.standings} previousOrder={previousOrder} offline={offline} big /> : null}
          <p className="flex items-center gap-3 text-2xl">
            <Icon name="rest" className="h-9 w-9 text-teal" />
            Everyone: take a break to rest your hands.
          </p>
          <Link to={`/results/${props.roomId}`} className={buttonClass("teal", "text-2xl")}>
            See note-by-note results
          </Link>
        </section>
      ) : null}
    </div>
  );
}

type RosterPlayer = NonNullable<ReturnType<typeof useRoomSocket>["state"]["roster"]>["players"][number];

/** Players by team, teams in order; one group with no heading when the round has no teams. */
function teamsOf(players: RosterPlayer[]): { team: number | null; members: RosterPlayer[] }[] {
  const teams = [...new Set(players.map((p) => p.team))].sort((a, b) => (a ?? -1) - (b ?? -1));
  return (teams.length ? teams : [null]).map((team) => ({ team, members: players.filter((p) => p.team === team) }));
}

function PlayerChip({ player, onRemove }: { player: RosterPlayer; onRemove: (playerId: string) => void }) {
  return (
    <motion.li
      layout
      initial={{ opacity: 0, scale: 0.8 }}
      animate={{ opacity: 1, scale: 1 }}
      exit={{ opacity: 0 }}
      className="flex items-center gap-2 rounded-full bg-white py-2 pr-2 pl-5 text-3xl shadow-sm"
    >
      {player.nickname}
      {player.online ? null : <Offline />}
      <button
        type="button"
        onClick={() => confirm(`Remove ${player.nickname} from the room?`) && onRemove(player.playerId)}
        className="ml-1 flex h-11 w-11 items-center justify-center rounded-full text-xl text-ink-soft hover:bg-brick/15"
        aria-label={`Remove ${player.nickname}`}
      >
        <Icon name="cross" />
      </button>
    </motion.li>
  );
}

type RevealMessage = NonNullable<ReturnType<typeof useRoomSocket>["state"]["reveal"]>;

/** Rows of answer counts before another column starts: more would push the neck below a 1366×768 screen. */
const COUNT_ROWS = 3;

/** How the class answered, kind by kind: icon and words for each, the count large enough for the back row. */
function AnswerCounts({ counts }: { counts: RevealMessage["counts"] }) {
  const reduce = useReducedMotion();
  const kinds = Object.entries(counts)
    .filter(([, n]) => n > 0)
    // The right answers first, then the commonest mistakes.
    .sort(([a, x], [b, y]) => Number(b === "home-spot") - Number(a === "home-spot") || y - x);
  return (
    <ul className="grid grid-flow-col content-center gap-2 text-xl" style={{ gridTemplateRows: `repeat(${Math.max(1, Math.min(COUNT_ROWS, kinds.length))}, auto)` }}>
      {kinds.map(([kind, n], i) => (
        <motion.li
          key={kind}
          initial={reduce ? false : { opacity: 0, x: 16 }}
          animate={{ opacity: 1, x: 0 }}
          transition={{ delay: reduce ? 0 : 0.08 * i, duration: 0.2 }}
          className={`flex items-center gap-3 rounded-2xl px-4 py-1 ${kind === "home-spot" ? "bg-teal text-white" : "bg-white"}`}
        >
          <Icon name={MISTAKE_ICONS[kind as keyof typeof MISTAKE_ICONS]} className="h-8 w-8" />
          <span className="flex-1">{kind === "no-answer" ? "no answer" : MISTAKE_LABELS[kind as keyof typeof MISTAKE_LABELS]}</span>
          <strong className="font-display text-5xl leading-none tabular-nums">{n}</strong>
        </motion.li>
      ))}
    </ul>
  );
}

/** Offline players are neither answers nor missed answers: the count says so in words, beside its own icon. */
function OfflineCount({ count }: { count: number }) {
  if (count === 0) return null;
  return (
    <p className="flex items-center gap-2 text-3xl text-ink-soft">
      <Icon name="warning" className="h-[1em] w-[1em]" /> {count} offline
    </p>
  );
}

function HomeSpotWords({ reveal }: { reveal: RevealMessage }) {
  const reduce = useReducedMotion();
  const naming = useNoteNaming();
  return (
    <motion.p initial={reduce ? false : { opacity: 0, scale: 0.9 }} animate={{ opacity: 1, scale: 1 }} transition={{ duration: 0.25 }} className="text-3xl leading-none">
      <span className="text-5xl font-semibold">{noteName(reveal.written, naming)}</span>
      <span className="mt-1 flex items-center gap-2">
        <span aria-hidden="true" className="flex h-8 w-8 items-center justify-center rounded-full bg-teal text-xl text-white">
          ✓
        </span>
        string {reveal.home.string}, {reveal.home.fret === 0 ? "open" : `fret ${reveal.home.fret}`}
      </span>
    </motion.p>
  );
}

/** The whole neck, so every spot of the pitch is in view, with the class's taps counted where they landed. */
function Reveal({ reveal, tuning, frets, position }: { reveal: RevealMessage; tuning: ReturnType<typeof resolveTuning>; frets: number; position: number }) {
  const reduce = useReducedMotion();
  return (
    <motion.div initial={reduce ? false : { opacity: 0, y: 16 }} animate={{ opacity: 1, y: 0 }} transition={{ duration: 0.3 }}>
      <Fretboard
        tuning={tuning}
        frets={frets}
        position={position}
        wholeNeck
        highlights={[{ ...reveal.home, kind: "home" }, ...reveal.otherSpots.map((s) => ({ ...s, kind: "other" as const }))]}
        heat={reveal.heat}
        size="stage"
      />
    </motion.div>
  );
}

/** The stage alone fills the projector: no browser bars, no site menu. */
function FullScreenButton({ target }: { target: React.RefObject<HTMLDivElement | null> }) {
  const [full, setFull] = useState(false);
  useEffect(() => {
    const change = () => setFull(document.fullscreenElement !== null);
    document.addEventListener("fullscreenchange", change);
    return () => document.removeEventListener("fullscreenchange", change);
  }, []);
  return (
    <button type="button" className={buttonClass("ghost")} onClick={() => (full ? document.exitFullscreen() : target.current?.requestFullscreen())?.catch(() => undefined)}>
      <Icon name="fullscreen" /> {full ? "Leave full screen" : "Full screen"}
    </button>
  );
}

function ConnectionBadge({ connection }: { connection: string }) {
  if (connection === "open") return null;
  return (
    <span className="inline-flex items-center gap-1 rounded-full bg-sky/20 px-3 py-1">
      <Icon name="again" className="h-[1em] w-[1em]" />
      {connection === "closed" ? "disconnected" : "connecting…"}
    </span>
  );
}

function HostControls({
  screen,
  paused,
  locked,
  onAction,
}: {
  screen: Exclude<Phase, "paused">;
  paused: boolean;
  locked: boolean;
  onAction: (a: "start" | "pause" | "resume" | "skip" | "next" | "end" | "lock" | "unlock") => void;
}) {
  const [confirmEnd, setConfirmEnd] = useState(false);
  useEffect(() => setConfirmEnd(false), [screen]);
  if (screen === "ended") return null;
  return (
    <div className="ml-auto flex flex-wrap gap-2">
      {screen === "lobby" ? (
        <>
          <button className={buttonClass("ghost")} onClick={() => onAction(locked ? "unlock" : "lock")}>
            <Icon name={locked ? "lock" : "unlock"} /> {locked ? "Locked — unlock" : "Lock room"}
          </button>
          <button className={buttonClass("teal", "text-xl")} onClick={() => onAction("start")}>
            <Icon name="play" /> Start
          </button>
        </>
      ) : (
        <>
          <button className={buttonClass("ghost")} onClick={() => onAction(paused ? "resume" : "pause")}>
            {paused ? (
              <>
                <Icon name="play" /> Resume
              </>
            ) : (
              <>
                <Icon name="pause" /> Pause
              </>
            )}
          </button>
          {screen === "prompt" ? (
            <button className={buttonClass("ghost")} onClick={() => onAction("skip")}>
              <Icon name="skip" /> Skip
            </button>
          ) : null}
          {screen === "reveal" || screen === "standings" ? (
            <button className={buttonClass("teal", "text-xl")} onClick={() => onAction("next")}>
              Next <Icon name="play" />
            </button>
          ) : null}
        </>
      )}
      <button className={buttonClass(confirmEnd ? "brick" : "ghost")} onClick={() => (confirmEnd ? onAction("end") : setConfirmEnd(true))}>
        {confirmEnd ? (
          "Really end?"
        ) : (
          <>
            <Icon name="stop" /> End
          </>
        )}
      </button>
    </div>
  );
}
