/**
 * The pad: the fretboard a student answers on, on their own phone. One answer per prompt,
 * locked on tap; the note itself is on the class screen, so eyes go up to read and down to play.
 * A tap says where it stands: sending (also through a dropped connection), counted, or not
 * counted with the server's reason, which unlocks the neck again while the prompt is open.
 * Built for one hand: the neck opens at the round's position, every spot is a big target, and the
 * settings a player needs (left-handed neck, sound) sit under the thumb at the bottom.
 */
import { useEffect, useMemo, useRef } from "react";
import { Fretboard } from "~/components/Fretboard";
import { useLeftHanded } from "~/components/LeftHanded";
import { getSoundPrefs, playSounding } from "~/components/sound";
import { PadSoundControl } from "~/components/SoundControl";
import { Button, Field, Notice } from "~/components/ui";
import { formatRoomCode } from "~/game/roomCode";
import type { Spot } from "~/music/fretboard";
import { MISTAKE_LABELS } from "~/music/mistakes";
import { resolveTuning } from "~/music/tuning";
import { settled, type AcceptedAck, type Tap } from "./answerQueue";
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
  const me = state.welcome?.you ?? null;
  // The start deals the teams again, and the roster says so; the welcome's team is the one at joining.
  const team = state.roster?.players.find((p) => p.playerId === me?.playerId)?.team ?? me?.team ?? null;
  const screen = screenOf(state);
  const prompt = state.prompt;
  const now = useNow(state.phase === "prompt" ? 100 : 0);
  // A signed-in student's name is known: the press that brought them here (Join, or the QR code) seats them.
  const autoJoined = useRef(false);
  const seatless = state.welcome !== null && state.welcome.you === null && state.connection === "open";
  useEffect(() => {
    if (!seatless || !props.accountName || autoJoined.current) return;
    autoJoined.current = true;
    join(props.accountName);
  }, [seatless, props.accountName, join]);

  if (state.closedReason) return <Notice tone="error">{state.closedReason}</Notice>;
  if (!me) return <JoinForm code={props.code} accountName={props.accountName} error={state.error} onJoin={join} connected={state.connection === "open"} />;

  const open = state.phase === "prompt" && prompt && now >= toLocal(prompt.showAt) && now <= toLocal(prompt.deadline);
  const taps = state.taps.filter((t) => t.promptId === prompt?.promptId);
  const mine = taps.at(-1) ?? null;
  // Full neck allows a player to keep finding spots until a miss ends their turn.
  const fullNeck = prompt?.mode === "full-neck";
  // A tap the server refused does not hold the neck: the student may try again while the prompt is open.
  const locked = !open || (!fullNeck && ((mine !== null && mine.status !== "refused") || state.ack !== null));

  const tap = (spot: Spot) => {
    if (!prompt || locked) return;
    // Full neck: a spot already tapped on this prompt is not sent again.
    if (taps.some((t) => t.status !== "refused" && t.spot.string === spot.string && t.spot.fret === spot.fret)) return;
    navigator.vibrate?.(15);
    answer(prompt.promptId, spot);
    // The pitch just played, heard as the answer goes, only when the player turned the pad's sound on (headphones).
    if (getSoundPrefs().padSound) void playSounding(tuning.strings[spot.string - 1]! + spot.fret);
  };

  const highlights = [
    ...(screen === "reveal" && state.reveal ? [{ ...state.reveal.home, kind: "home" as const }] : []),
    ...(mine && mine.status !== "refused"
      ? [{ ...mine.spot, kind: mine.ack ? (mine.ack.diagnosis.pitchRight ? ("tapped-right" as const) : ("tapped-wrong" as const)) : ("tapped" as const) }]
      : []),
    // Full neck's finds give the note away: shown while it is open and at its reveal, not while paused.
    ...((open || screen === "reveal") && state.progress ? state.progress.found.map((s) => ({ ...s, kind: "other" as const })) : []),
  ];
  const ended = screen === "ended";
  // A tap on an earlier note still on its way, or refused after the round moved on (a dropped connection).
  const earlier = mine ? null : (state.taps.findLast((t) => t.promptId !== prompt?.promptId && t.status !== "counted") ?? null);
  const status = ended ? null : (
    <>
      {earlier ? <EarlierTap tap={earlier} /> : null}
      <Status state={state} open={Boolean(open)} waiting={Boolean(prompt && now < toLocal(prompt.showAt))} tap={mine} />
    </>
  );

  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-3">
      <div className="flex items-center gap-3 text-lg">
        <span className="min-w-0 truncate font-display text-xl font-semibold">{me.nickname}</span>
        {team === null ? null : <TeamName team={team} className="shrink-0 rounded-full bg-ink px-3 text-paper" />}
        {ended || state.connection === "open" ? null : (
          <span role="status" className="rounded-full bg-sky/20 px-3">
            <Icon name="again" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
            reconnecting…
          </span>
        )}
        {/* On its side the phone has width to spare and no height: the status joins this row. */}
        {short ? <div className="min-w-0 flex-1">{status}</div> : null}
        <span className="ml-auto shrink-0 text-ink-soft">room {formatRoomCode(props.code)}</span>
      </div>
      {ended ? (
        state.ended && (
          <Ended
            summary={state.ended.summaries.find((s) => s.playerId === me.playerId)}
            place={placeOf(state.standings, me.playerId)}
            tuneName={state.ended.tuneName}
          />
        )
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
        <PadSoundControl />
      </div>
    </div>
  );
}

function Status({ state, open, waiting, tap }: { state: LiveView; open: boolean; waiting: boolean; tap: Tap | null }) {
  const screen = screenOf(state);
  if (state.phase === "paused")
    return (
      <Banner tone="info">
        <Icon name="pause" /> Paused: wait for the teacher to go on{tap && !settled(tap) ? ". Your tap goes in when the round goes on." : ""}
      </Banner>
    );
  const onPrompt = screen === "prompt" || screen === "reveal";
  // Never "counted" before the server says so.
  if (onPrompt && tap && !settled(tap)) return <Sending offline={state.connection !== "open"} />;
  if (onPrompt && tap?.refusal) return <Banner tone="error">✗ Not counted. {tap.refusal.reason}</Banner>;
  // The verdict on this prompt's answer stays up through its reveal (after a reload: the catch-up's ack).
  const ack: AcceptedAck | null = tap ? (tap.ack ?? null) : state.ack;
  if (onPrompt && ack && state.prompt && ack.promptId === state.prompt.promptId) {
    const right = ack.diagnosis.kind === "home-spot";
    return (
      // The motion is CSS (app.css), which the reduced-motion rule there stills.
      <div
        role="status"
        className={`animate-pop-in rounded-2xl p-3 text-white [@media(max-height:500px)]:py-1 ${ack.diagnosis.pitchRight ? "bg-teal" : "bg-brick"}`}
      >
        <p className="flex flex-wrap items-center gap-x-3 font-display text-2xl font-semibold">
          <span>
            <Icon name={MISTAKE_ICONS[ack.diagnosis.kind]} className="mr-2 inline h-6 w-6 align-[-0.15em]" />
            {right ? "Home spot!" : MISTAKE_LABELS[ack.diagnosis.kind]}
          </span>
          <span className="tabular-nums">+{ack.points}</span>
          {ack.streak > 1 ? (
            // The streak pops each time it grows (a new key, a new element), so a run of right answers is felt, not just read.
            <span key={ack.streak} className="inline-flex animate-streak-pop items-center gap-1 rounded-full bg-white/20 px-3">
              <Icon name="streak" /> {ack.streak} in a row
            </span>
          ) : null}
        </p>
        <p className="text-lg">{ack.diagnosis.message}</p>
        <p className="text-sm opacity-90">Counted · total {ack.total} points</p>
      </div>
    );
  }
  if (state.error) return <Banner tone="error">✗ {state.error}</Banner>;
  if (screen === "reveal") return <Banner tone="info">Time! The home spot is marked ✓ on your neck.</Banner>;
  if (screen === "standings") return <Banner tone="info">Standings are on the class screen.</Banner>;
  if (screen === "prompt" && waiting) return <Banner tone="info">Get ready… look up at the class screen</Banner>;
  if (screen === "prompt" && open)
    return (
      <Banner tone="go">
        {/* The note (with its count of spots) reaches the pad just after showAt; the task is Full neck's own from the start. */}
        {state.prompt?.mode === "full-neck" ? <FindEvery spots={state.note?.spotsToFind ?? null} /> : "Find the note on the class screen and tap its home spot"}
      </Banner>
    );
  return <Banner tone="info">You're in. Watch the class screen.</Banner>;
}

function Sending({ offline }: { offline: boolean }) {
  return (
    <Banner tone="info">
      <span aria-hidden="true">⟳</span> Sending your tap…{offline ? " It goes as soon as the connection is back." : ""}
    </Banner>
  );
}

/** One line about a tap on an earlier note that has not been counted, above the current status. */
function EarlierTap({ tap }: { tap: Tap }) {
  if (!tap.refusal) return <Sending offline={false} />;
  return (
    <p role="status" className="rounded-2xl border-2 border-brick bg-brick/10 px-3 py-1 text-lg">
      ✗ Your tap on the last note was not counted. {tap.refusal.reason}
    </p>
  );
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

/** The player's own place in the final standings (and their team's), from the standings the end brought. */
function placeOf(standings: LiveView["standings"], playerId: string) {
  if (!standings?.final) return null;
  const row = standings.points.find((r) => r.playerId === playerId);
  if (!row) return null;
  const team = row.team === null ? null : standings.teams.findIndex((t) => t.team === row.team);
  return { rank: row.rank, of: standings.points.length, team: team === null || team < 0 ? null : { rank: team + 1, of: standings.teams.length, name: standings.teams[team]!.name } };
}

const ordinal = (n: number) => `${n}${n % 100 >= 11 && n % 100 <= 13 ? "th" : ["th", "st", "nd", "rd"][n % 10] ?? "th"}`;

function Ended({
  summary,
  place,
  tuneName,
}: {
  summary?: { points: number; correct: number; answered: number; longestStreak: number };
  place: ReturnType<typeof placeOf>;
  tuneName: string | null;
}) {
  return (
    <section className="animate-rise-in space-y-4">
      <h1 className="font-display text-3xl font-semibold">Round over — well played!</h1>
      {tuneName ? <p className="text-xl">The tune was “{tuneName}”.</p> : null}
      {summary ? (
        <div className="rounded-2xl bg-white p-4">
          <p className="font-display leading-none">
            <span className="text-6xl font-semibold tabular-nums">{summary.points}</span> <span className="text-2xl">points</span>
          </p>
          {place ? (
            <p className="mt-3 font-display text-3xl" data-testid="own-place">
              <span className="font-semibold">{ordinal(place.rank)}</span> of {place.of}
              {place.team ? (
                <span className="block text-xl">
                  Team {place.team.name}: {ordinal(place.team.rank)} of {place.team.of} teams
                </span>
              ) : null}
            </p>
          ) : null}
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
    </section>
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
