/**
 * The pad: the fretboard a student answers on, on their own phone. One answer per prompt,
 * locked on tap; the note itself is on the class screen, so eyes go up to read and down to play.
 * Built for one hand: the neck opens at the round's position, every spot is a big target, and the
 * settings a player needs (left-handed neck, sound) sit under the thumb at the bottom.
 */
import { AnimatePresence, motion, useReducedMotion } from "framer-motion";
import { useMemo, useState } from "react";
import { Fretboard } from "~/components/Fretboard";
import { useLeftHanded } from "~/components/LeftHanded";
import { playSounding } from "~/components/sound";
import { SoundControl } from "~/components/SoundControl";
import { Button, Field, Notice } from "~/components/ui";
import { formatRoomCode } from "~/game/roomCode";
import type { Spot } from "~/music/fretboard";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import { FindEvery, Icon, MISTAKE_ICONS, StandingsBoard, TeamName, useMedia, useNow } from "./parts";
import { screenOf, useRoomSocket, type LiveView } from "./useRoomSocket";

export interface PadProps {
  code: string;
  tuning: string;
  frets: number;
  position: number;
  accountName: string | null;
}

export function Pad(props: PadProps) {
  const { state, join, answer, toLocal } = useRoomSocket(props.code, { role: "player" });
  const tuning = useMemo(() => resolveTuning(props.tuning), [props.tuning]);
  const [leftHanded, chooseHand] = useLeftHanded();
  // A phone on its side has little height: smaller cells keep all six strings on screen.
  const short = useMedia("(max-height: 500px)");
  const [tapped, setTapped] = useState<{ promptId: string; spot: Spot } | null>(null);
  const me = state.welcome?.you ?? null;
  // The start deals the teams again, and the roster says so; the welcome's team is the one at joining.
  const team = state.roster?.players.find((p) => p.playerId === me?.playerId)?.team ?? me?.team ?? null;
  const screen = screenOf(state);
  const prompt = state.prompt;
  const now = useNow(state.phase === "prompt" ? 100 : 0);

  if (state.closedReason) return <Notice tone="error">{state.closedReason}</Notice>;
  if (!me) return <JoinForm code={props.code} accountName={props.accountName} error={state.error} onJoin={join} connected={state.connection === "open"} />;

  const open = state.phase === "prompt" && prompt && now >= toLocal(prompt.showAt) && now <= toLocal(prompt.deadline);
  const mine = tapped?.promptId === prompt?.promptId ? tapped : null;
  // Full neck allows a player to keep finding spots until a miss ends their turn.
  const fullNeck = prompt?.mode === "full-neck";
  const locked = !open || (!fullNeck && (mine !== null || state.ack !== null));

  const tap = (spot: Spot) => {
    if (!prompt || locked) return;
    setTapped({ promptId: prompt.promptId, spot });
    navigator.vibrate?.(15);
    answer(prompt.promptId, spot);
    // The pitch just played, heard as the answer goes; silent when the player has turned sound off.
    void playSounding(tuning.strings[spot.string - 1]! + spot.fret);
  };

  const highlights = [
    ...(screen === "reveal" && state.reveal ? [{ ...state.reveal.home, kind: "home" as const }] : []),
    ...(mine ? [{ ...mine.spot, kind: state.ack ? (state.ack.diagnosis.pitchRight ? ("tapped-right" as const) : ("tapped-wrong" as const)) : ("tapped" as const) }] : []),
    ...(state.progress?.found.map((s) => ({ ...s, kind: "other" as const })) ?? []),
  ];
  const ended = screen === "ended";
  const status = ended ? null : <Status state={state} open={Boolean(open)} waiting={Boolean(prompt && now < toLocal(prompt.showAt))} />;

  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-3">
      <div className="flex items-center gap-3 text-lg">
        <span className="min-w-0 truncate font-display text-xl font-semibold">{me.nickname}</span>
        {team === null ? null : <TeamName team={team} className="shrink-0 rounded-full bg-ink px-3 text-paper" />}
        {ended || state.connection === "open" ? null : (
          <span role="status" className="rounded-full bg-sky/20 px-3">
            ⟳ reconnecting…
          </span>
        )}
        {/* On its side the phone has width to spare and no height: the status joins this row. */}
        {short ? <div className="min-w-0 flex-1">{status}</div> : null}
        <span className="ml-auto shrink-0 text-ink-soft">room {formatRoomCode(props.code)}</span>
      </div>
      {ended ? (
        state.ended && <Ended summary={state.ended.summaries.find((s) => s.playerId === me.playerId)} tuneName={state.ended.tuneName} />
      ) : (
        <>
          {short ? null : status}
          <Fretboard
            tuning={tuning}
            frets={props.frets}
            position={props.position}
            leftHanded={leftHanded}
            highlights={highlights}
            onTap={tap}
            disabled={locked}
            size={short ? "page" : "pad"}
            label={`Your neck${leftHanded ? ", left-handed" : ""}, position ${props.position}; ${fullNeck ? "tap every spot of the note" : "tap the home spot"}`}
          />
          {screen === "standings" && state.standings ? <StandingsBoard standings={state.standings} highlight={me.playerId} /> : null}
        </>
      )}
      <div className="mt-auto flex flex-wrap items-center gap-3 border-t border-ink/10 pt-3">
        <button
          type="button"
          aria-pressed={leftHanded}
          onClick={() => chooseHand(!leftHanded)}
          className={`inline-flex min-h-12 items-center gap-2 rounded-2xl border-2 px-4 text-lg font-medium ${leftHanded ? "border-teal bg-teal/10" : "border-ink/20"}`}
        >
          <Icon name="mirror" className="h-6 w-6" />
          Left-handed neck{leftHanded ? ": on" : ""}
        </button>
        <SoundControl />
      </div>
    </div>
  );
}

function Status({ state, open, waiting }: { state: LiveView; open: boolean; waiting: boolean }) {
  const reduce = useReducedMotion();
  const screen = screenOf(state);
  const ack = state.ack;
  if (state.phase === "paused")
    return (
      <Banner tone="info">
        <Icon name="pause" /> Paused: wait for the teacher to go on
      </Banner>
    );
  // The verdict on this prompt's answer stays up through its reveal.
  if ((screen === "prompt" || screen === "reveal") && ack && state.prompt && ack.promptId === state.prompt.promptId) {
    const right = ack.diagnosis.kind === "home-spot";
    return (
      <motion.div
        initial={reduce ? false : { scale: 0.92, opacity: 0 }}
        animate={{ scale: 1, opacity: 1 }}
        transition={{ duration: 0.2 }}
        role="status"
        className={`rounded-2xl p-3 text-white [@media(max-height:500px)]:py-1 ${ack.diagnosis.pitchRight ? "bg-teal" : "bg-brick"}`}
      >
        <p className="flex flex-wrap items-center gap-x-3 font-display text-2xl font-semibold">
          <span>
            <span aria-hidden="true">{MISTAKE_ICONS[ack.diagnosis.kind]} </span>
            {right ? "Home spot!" : MISTAKE_LABELS[ack.diagnosis.kind]}
          </span>
          <span className="tabular-nums">+{ack.points}</span>
          <AnimatePresence>
            {ack.streak > 1 ? (
              // The streak pops each time it grows, so a run of right answers is felt, not just read.
              <motion.span
                key={ack.streak}
                initial={reduce ? false : { scale: 1.6, opacity: 0 }}
                animate={{ scale: 1, opacity: 1 }}
                transition={{ type: "spring", stiffness: 400, damping: 18 }}
                className="inline-flex items-center gap-1 rounded-full bg-white/20 px-3"
              >
                <Icon name="streak" /> {ack.streak} in a row
              </motion.span>
            ) : null}
          </AnimatePresence>
        </p>
        <p className="text-lg">{ack.diagnosis.message}</p>
        <p className="text-sm opacity-90">Total {ack.total} points</p>
      </motion.div>
    );
  }
  if (state.error) return <Banner tone="error">✗ {state.error}</Banner>;
  if (screen === "reveal") return <Banner tone="info">Time! The home spot is marked ✓ on your neck.</Banner>;
  if (screen === "standings") return <Banner tone="info">Standings are on the class screen.</Banner>;
  if (screen === "prompt" && waiting) return <Banner tone="info">Get ready… look up at the class screen</Banner>;
  if (screen === "prompt" && open)
    return <Banner tone="go">{state.prompt?.spotsToFind ? <FindEvery spots={state.prompt.spotsToFind} /> : "Find the note on the class screen and tap its home spot"}</Banner>;
  return <Banner tone="info">You're in. Watch the class screen.</Banner>;
}

function Banner({ tone, children }: { tone: "info" | "error" | "go"; children: React.ReactNode }) {
  const cls = tone === "error" ? "border-brick bg-brick/10" : tone === "go" ? "border-brass bg-brass/25 font-semibold" : "border-sky bg-sky/10";
  return (
    <p
      role="status"
      className={`flex min-h-16 items-center justify-center gap-2 rounded-2xl border-2 p-3 text-center font-display text-xl [@media(max-height:500px)]:min-h-0 [@media(max-height:500px)]:py-1 [@media(max-height:500px)]:text-lg ${cls}`}
    >
      {children}
    </p>
  );
}

function Ended({ summary, tuneName }: { summary?: { points: number; correct: number; answered: number; longestStreak: number }; tuneName: string | null }) {
  const reduce = useReducedMotion();
  return (
    <motion.section initial={reduce ? false : { opacity: 0, y: 12 }} animate={{ opacity: 1, y: 0 }} className="space-y-4">
      <h1 className="font-display text-3xl font-semibold">Round over — well played!</h1>
      {tuneName ? <p className="text-xl">The tune was “{tuneName}”.</p> : null}
      {summary ? (
        <div className="rounded-2xl bg-white p-4">
          <p className="font-display leading-none">
            <span className="text-6xl font-semibold tabular-nums">{summary.points}</span> <span className="text-2xl">points</span>
          </p>
          <p className="mt-3 text-xl">
            <span aria-hidden="true">✓ </span>
            {summary.correct} of {summary.answered} home spots
          </p>
          <p className="mt-1 flex items-center gap-2 text-xl">
            <Icon name="streak" className="h-5 w-5 text-brass" /> longest streak {summary.longestStreak}
          </p>
        </div>
      ) : null}
      <p className="flex items-center gap-3 rounded-2xl border-2 border-teal bg-teal/10 p-4 text-xl">
        <Icon name="rest" className="h-10 w-10 text-teal" />
        <span>
          <strong>Take a break to rest your hands.</strong> Shake them out and stretch your fingers before you practise again.
        </span>
      </p>
    </motion.section>
  );
}

function JoinForm({ code, accountName, error, onJoin, connected }: { code: string; accountName: string | null; error: string | null; onJoin: (n: string) => void; connected: boolean }) {
  return (
    <div className="mx-auto max-w-sm space-y-4 pt-4">
      <h1 className="font-display text-3xl font-semibold">Join room {formatRoomCode(code)}</h1>
      {error ? <Notice tone="error">{error}</Notice> : null}
      <form
        className="space-y-4"
        onSubmit={(e) => {
          e.preventDefault();
          onJoin(accountName ?? String(new FormData(e.currentTarget).get("nickname") ?? ""));
        }}
      >
        {accountName ? (
          <p className="text-lg">
            {/* Names often end in an initial's full stop ("Amani K."): no second one after it. */}
            You'll play as <strong>{accountName}</strong>
            {accountName.endsWith(".") ? "" : "."}
          </p>
        ) : (
          <Field label="Nickname" name="nickname" maxLength={20} autoComplete="off" hint="2–20 characters. No need for your full name." required />
        )}
        <Button type="submit" tone="teal" className="min-h-14 w-full text-xl" disabled={!connected}>
          {connected ? "Join" : "Connecting…"}
        </Button>
      </form>
    </div>
  );
}
