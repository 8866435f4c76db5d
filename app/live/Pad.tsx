/**
 * The pad: the fretboard a student answers on, on their own phone. One answer per prompt,
 * locked on tap; the note itself is on the class screen, so eyes go up to read and down to play.
 */
import { motion, useReducedMotion } from "framer-motion";
import { useMemo, useState } from "react";
import { Fretboard } from "~/components/Fretboard";
import { Button, Field, Notice } from "~/components/ui";
import { formatRoomCode } from "~/game/roomCode";
import type { Spot } from "~/music/fretboard";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import { MISTAKE_ICONS, StandingsBoard, useNow } from "./parts";
import { useRoomSocket } from "./useRoomSocket";

export interface PadProps {
  code: string;
  tuning: string;
  frets: number;
  position: number;
  accountName: string | null;
}

const HANDED_KEY = "fretcall-left-handed";

export function Pad(props: PadProps) {
  const { state, join, answer, toLocal } = useRoomSocket(props.code, { role: "player" });
  const tuning = useMemo(() => resolveTuning(props.tuning), [props.tuning]);
  const [leftHanded, setLeftHanded] = useState(() => typeof localStorage !== "undefined" && localStorage.getItem(HANDED_KEY) === "1");
  const [tapped, setTapped] = useState<{ promptId: string; spot: Spot } | null>(null);
  const me = state.welcome?.you ?? null;
  const prompt = state.prompt;
  const now = useNow(prompt && !state.reveal ? 100 : 0);

  if (state.closedReason) return <Notice tone="error">{state.closedReason}</Notice>;
  if (!me) return <JoinForm code={props.code} accountName={props.accountName} error={state.error} onJoin={join} connected={state.connection === "open"} />;

  const open = prompt && !state.reveal && !state.paused && now >= toLocal(prompt.showAt) && now <= toLocal(prompt.deadline);
  const mine = tapped?.promptId === prompt?.promptId ? tapped : null;
  // Full neck allows a player to keep finding spots until a miss ends their turn.
  const fullNeck = prompt?.mode === "full-neck";
  const locked = !open || (!fullNeck && (mine !== null || state.ack !== null));

  const tap = (spot: Spot) => {
    if (!prompt || locked) return;
    setTapped({ promptId: prompt.promptId, spot });
    navigator.vibrate?.(15);
    answer(prompt.promptId, spot);
  };

  const highlights = [
    ...(state.reveal ? [{ ...state.reveal.home, kind: "home" as const }] : []),
    ...(mine ? [{ ...mine.spot, kind: state.ack ? (state.ack.diagnosis.pitchRight ? ("tapped-right" as const) : ("tapped-wrong" as const)) : ("tapped" as const) }] : []),
    ...(state.progress?.found.map((s) => ({ ...s, kind: "other" as const })) ?? []),
  ];

  return (
    <div className="-mx-4 -my-6 flex min-h-[calc(100dvh-8rem)] flex-col gap-3 px-3 py-3">
      <div className="flex items-center justify-between text-lg">
        <span className="font-display font-semibold">{me.nickname}</span>
        <span className="text-ink-soft">room {formatRoomCode(props.code)}</span>
        {state.connection !== "open" ? <span className="rounded-full bg-sky/20 px-3">⟳ reconnecting…</span> : null}
      </div>
      <Status state={state} open={Boolean(open)} waiting={Boolean(prompt && now < toLocal(prompt.showAt))} />
      <div className="flex-1">
        <Fretboard
          tuning={tuning}
          frets={props.frets}
          position={props.position}
          leftHanded={leftHanded}
          highlights={highlights}
          onTap={tap}
          disabled={locked}
          size="pad"
        />
      </div>
      {state.standings && !state.reveal && !state.ended ? <StandingsBoard standings={state.standings} highlight={me.playerId} /> : null}
      {state.ended ? <Ended summary={state.ended.summaries.find((s) => s.playerId === me.playerId)} tuneName={state.ended.tuneName} /> : null}
      <label className="flex items-center gap-2 self-end text-sm">
        <input
          type="checkbox"
          checked={leftHanded}
          onChange={(e) => {
            setLeftHanded(e.target.checked);
            localStorage.setItem(HANDED_KEY, e.target.checked ? "1" : "0");
          }}
          className="h-5 w-5"
        />
        Left-handed neck
      </label>
    </div>
  );
}

function Status({ state, open, waiting }: { state: ReturnType<typeof useRoomSocket>["state"]; open: boolean; waiting: boolean }) {
  const reduce = useReducedMotion();
  const ack = state.ack;
  if (state.paused) return <Banner tone="info">⏸ Paused by the teacher</Banner>;
  if (ack && state.prompt && ack.promptId === state.prompt.promptId) {
    const right = ack.diagnosis.kind === "home-spot";
    return (
      <motion.div initial={reduce ? false : { scale: 0.95, opacity: 0 }} animate={{ scale: 1, opacity: 1 }} role="status" className={`rounded-2xl p-3 text-white ${ack.diagnosis.pitchRight ? "bg-teal" : "bg-brick"}`}>
        <p className="font-display text-2xl font-semibold">
          <span aria-hidden="true">{MISTAKE_ICONS[ack.diagnosis.kind]} </span>
          {right ? "Home spot!" : MISTAKE_LABELS[ack.diagnosis.kind]} · +{ack.points}
          {ack.streak > 1 ? <span className="ml-2">🔥 {ack.streak} in a row</span> : null}
        </p>
        <p className="text-lg">{ack.diagnosis.message}</p>
        <p className="text-sm opacity-90">Total {ack.total} points</p>
      </motion.div>
    );
  }
  if (state.error) return <Banner tone="error">✗ {state.error}</Banner>;
  if (state.reveal) return <Banner tone="info">Time! The home spot is marked ✓ on your neck.</Banner>;
  if (waiting) return <Banner tone="info">Get ready… look at the class screen</Banner>;
  if (open) return <Banner tone="go">Find the note on the class screen and tap its home spot</Banner>;
  if (state.ended) return <Banner tone="info">Round over — well played!</Banner>;
  return <Banner tone="info">You're in. Watch the class screen.</Banner>;
}

function Banner({ tone, children }: { tone: "info" | "error" | "go"; children: React.ReactNode }) {
  const cls = tone === "error" ? "border-brick bg-brick/10" : tone === "go" ? "border-brass bg-brass/20" : "border-sky bg-sky/10";
  return (
    <p role="status" className={`rounded-2xl border-2 p-3 text-center font-display text-xl ${cls}`}>
      {children}
    </p>
  );
}

function Ended({ summary, tuneName }: { summary?: { points: number; correct: number; answered: number; longestStreak: number }; tuneName: string | null }) {
  if (!summary) return null;
  return (
    <div className="rounded-2xl bg-white p-4 text-lg">
      {tuneName ? <p>The tune was “{tuneName}”.</p> : null}
      <p>
        <strong>{summary.points}</strong> points · {summary.correct} of {summary.answered} home spots · longest streak {summary.longestStreak}
      </p>
      <p className="mt-2 text-sm text-ink-soft">Good work. Give your fretting hand a rest before you practise again.</p>
    </div>
  );
}

function JoinForm({ code, accountName, error, onJoin, connected }: { code: string; accountName: string | null; error: string | null; onJoin: (n: string) => void; connected: boolean }) {
  return (
    <div className="mx-auto max-w-sm space-y-4">
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
            You'll play as <strong>{accountName}</strong>.
          </p>
        ) : (
          <Field label="Nickname" name="nickname" maxLength={20} autoComplete="off" hint="2–20 characters. No need for your full name." required />
        )}
        <Button type="submit" tone="teal" className="w-full text-xl" disabled={!connected}>
          {connected ? "Join" : "Connecting…"}
        </Button>
      </form>
    </div>
  );
}
