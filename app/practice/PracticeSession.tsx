/**
 * A solo practice session on a phone: the note on the staff, the fretboard beneath, feedback in plain words and
 * the sound of the note after each answer. The adaptive rule picks each note from the student's history and this
 * session's answers; finished answers go to the outbox (useAnswerQueue), so a dropped connection loses nothing.
 */
import { nanoid } from "nanoid";
import { useEffect, useMemo, useRef, useState } from "react";
import { Link } from "react-router";
import { Fretboard, type Highlight } from "~/components/Fretboard";
import { NoteNamingChoice, useNoteNaming } from "~/components/NoteNaming";
import { Icon } from "~/components/Icon";
import { SoundControl } from "~/components/SoundControl";
import { playSounding } from "~/components/sound";
import { Staff } from "~/components/Staff";
import { LeftHandedToggle, useLeftHanded } from "~/components/LeftHanded";
import { Button, buttonClass, Card, Notice } from "~/components/ui";
import { useMedia } from "~/live/parts";
import { median } from "~/lib/median";
import { soundingMidi, type Spot } from "~/music/fretboard";
import { diagnose, diagnosePlayed, MISTAKE_ICONS, MISTAKE_LABELS, type Diagnosis } from "~/music/mistakes";
import type { HeardNote } from "~/listen/detector";
import { useListening } from "~/listen/useListening";
import { seededRandom } from "~/music/pools";
import { resolveTuning } from "~/music/tuning";
import { allSteady, chooseNext, noteName, noteStates, STEADY_BOX, TOP_BOX, type Choice, type PracticeAnswer } from "./adaptive";
import type { PracticePlan } from "./pool";
import { DueTime } from "./AssignmentParts";
import { useAnswerQueue, type QueueStatus } from "./useAnswerQueue";
import { InputBadge, PlayOffer, PlayPanel, PlaySetup, type PlayStage } from "./PlayMode";
import { plural } from "~/lib/plural";

interface Asked {
  choice: Choice;
  shownAt: number;
  /** A tap's spot, or the note a microphone heard (sounding MIDI number and cents). */
  answer: { spot: Spot | null; heard: { midi: number; cents: number } | null; diagnosis: Diagnosis; reactionMs: number } | null;
}

/** In play mode the feedback stays this long before the next note comes by itself: the hands stay on the guitar. */
const PLAYED_NEXT_MS = 1800;

const localMidnight = () => new Date(new Date().setHours(0, 0, 0, 0)).getTime();

export function PracticeSession({ userId, plan, history, count }: { userId: string; plan: PracticePlan; history: PracticeAnswer[]; count: number }) {
  const tuning = useMemo(() => resolveTuning(plan.tuning), [plan.tuning]);
  const { status, add } = useAnswerQueue(userId);
  const [leftHanded, setLeftHanded] = useLeftHanded();
  const naming = useNoteNaming();
  const [mine, setMine] = useState<PracticeAnswer[]>([]);
  const [asked, setAsked] = useState<Asked[]>([]);
  const random = useRef<() => number>(() => 0);
  const [stage, setStage] = useState<PlayStage>("off");
  const listening = useListening({ onNote: (heard) => played(heard) });
  const playing = stage === "on" && listening.status === "listening";
  const roundStart = useRef(0);

  // A phone's height (640–740 px) fits the staff, the instruction and the position's six strings with 44 px cells;
  // a taller screen gets the pad's bigger ones.
  const short = useMedia("(max-height: 760px)");
  const answerArea = useRef<HTMLDivElement>(null);
  const nextBar = useRef<HTMLDivElement>(null);

  const current = asked.at(-1) ?? null;
  const inRound = asked.length - roundStart.current;
  const finished = current !== null && current.answer !== null && inRound >= count;
  const states = useMemo(() => noteStates([...history, ...mine], localMidnight()), [history, mine]);

  const ask = (previous: number | undefined, list: Asked[]) => {
    const choice = chooseNext(plan.notes, noteStates([...history, ...mine], localMidnight()), { previous, random: random.current, naming });
    setAsked([...list, { choice, shownAt: performance.now(), answer: null }]);
  };

  const start = () => {
    random.current = seededRandom(Date.now());
    roundStart.current = asked.length;
    ask(current?.choice.note.writtenMidi, asked);
  };

  /** Records the answer to the note shown, tapped (spot) or played (heard); the server checks it again. */
  const give = (given: { spot: Spot } | { heard: HeardNote }, reactionMs: number) => {
    if (!current || current.answer) return;
    const note = plan.notes.find((n) => n.writtenMidi === current.choice.note.writtenMidi)!;
    const common = { note, keyFifths: plan.keyFifths, reading: "guitar" as const, naming };
    const diagnosis =
      "spot" in given
        ? diagnose({ ...common, tapped: given.spot, tuning, homeOnly: plan.homeOnly })
        : diagnosePlayed({ ...common, heardMidi: given.heard.midi });
    const at = Date.now();
    add({
      clientId: nanoid(),
      source: plan.source,
      assignmentId: plan.assignmentId,
      classId: plan.classId,
      position: plan.position,
      tuning: plan.tuning,
      keyFifths: plan.keyFifths,
      written: note.written,
      ...("spot" in given
        ? { input: "tap" as const, string: given.spot.string, fret: given.spot.fret }
        : { input: "played" as const, heardMidi: given.heard.midi, heardCents: Math.round(given.heard.cents) }),
      reactionMs,
      at,
    });
    setMine((m) => [...m, { writtenMidi: note.writtenMidi, kind: diagnosis.kind, reactionMs, at }]);
    const answer = { spot: "spot" in given ? given.spot : null, heard: "heard" in given ? { midi: given.heard.midi, cents: given.heard.cents } : null, diagnosis, reactionMs };
    setAsked((list) => [...list.slice(0, -1), { ...current, answer }]);
  };

  const tap = (spot: Spot) => {
    if (!current || current.answer) return;
    // Played back after a tap only: while the phone listens, the speaker would answer for the student.
    if (!playing) void playSounding(soundingMidi(current.choice.note.writtenMidi, "guitar")).catch(() => undefined);
    navigator.vibrate?.(15);
    give({ spot }, Math.max(0, Math.round(performance.now() - current.shownAt)));
  };

  // Reaction time runs from the note shown to the attack (onsetMs, already corrected for the input latency, on
  // the same performance.now() clock). A note begun before this one was shown belongs to the previous one.
  const played = (heard: HeardNote) => {
    if (!current || current.answer || stage !== "on" || heard.onsetMs < current.shownAt) return;
    give({ heard }, Math.round(heard.onsetMs - current.shownAt));
  };

  const next = () => {
    if (!current) return;
    // Back to the top, where the new note is on the staff.
    window.scrollTo({ top: 0 });
    ask(current.choice.note.writtenMidi, asked);
  };

  // After an answer the feedback and the neck with its home spot must be in view above the thumb's Next button:
  // scroll just enough (the staff may leave the top), never past the feedback's own top.
  const answered = current?.answer ?? null;
  useEffect(() => {
    if (!answered?.heard || finished || !playing) return;
    const timer = window.setTimeout(next, PLAYED_NEXT_MS);
    return () => window.clearTimeout(timer);
    // Only a new answer (or the end, or listening stopping) restarts the wait; the meter's updates must not.
  }, [answered, finished, playing]);
  // The microphone goes off when the session is done; the student turns it on again for another round.
  const { stop } = listening;
  useEffect(() => {
    if (finished) stop();
  }, [finished, stop]);
  useEffect(() => {
    const area = answerArea.current;
    if (!answered || !area) return;
    const room = window.innerHeight - (nextBar.current?.offsetHeight ?? 0);
    const box = area.getBoundingClientRect();
    if (box.bottom > room) window.scrollBy({ top: Math.max(0, Math.min(box.top, box.bottom - room)) });
  }, [answered]);

  const note = current ? plan.notes.find((n) => n.writtenMidi === current.choice.note.writtenMidi)! : null;
  const highlights: Highlight[] =
    current?.answer && note
      ? [
          { ...note.home, kind: "home" },
          ...(current.answer.diagnosis.kind === "home-spot" || current.answer.spot === null
            ? []
            : [{ ...current.answer.spot, kind: current.answer.diagnosis.pitchRight ? ("tapped-right" as const) : ("tapped-wrong" as const) }]),
        ]
      : [];

  const barShown = current !== null && current.answer !== null && !finished;
  return (
    <div className={`-mx-1 flex flex-col gap-2 sm:gap-3 ${barShown ? "pb-20 sm:pb-0" : ""}`}>
      <header>
        <div className="flex items-baseline gap-3">
          <h1 className="min-w-0 flex-1 truncate font-display text-xl font-semibold sm:text-2xl">{plan.title}</h1>
          {current === null ? null : (
            <span aria-live="polite" className="shrink-0 tabular-nums">
              Note {Math.min(inRound, count)} of {count}
            </span>
          )}
        </div>
        <p className="text-sm text-ink-soft">
          Position {plan.position} · {tuning.name}
          {plan.classMap ? " · your class's home spots" : ""}
        </p>
        {plan.countsToward ? <CountsToward assignment={plan.countsToward} /> : null}
      </header>
      {plan.outside.length > 0 ? (
        <Notice tone="info">Some notes of this tune lie outside position {plan.position} and are left out: {plan.outside.join(", ")}.</Notice>
      ) : null}

      {current === null ? (
        <StartCard count={count} onStart={start} />
      ) : (
        <>
          <div aria-hidden="true" className="h-1.5 overflow-hidden rounded-full bg-ink/10">
            <div className="h-full bg-brass" style={{ width: `${(100 * Math.min(inRound, count)) / count}%` }} />
          </div>
          <Card className="p-1! sm:p-3!">
            <div data-written={note!.written} data-written-midi={note!.writtenMidi}>
              <Staff notes={[{ written: note!.written }]} keyFifths={plan.keyFifths} size="phone" />
            </div>
          </Card>
          <div ref={answerArea} className="flex flex-col gap-2 sm:gap-3">
            <Feedback asked={current} playing={playing} />
            {stage === "on" ? <PlayPanel listening={listening} onTap={() => setStage("off")} /> : null}
            <Fretboard
              tuning={tuning}
              frets={plan.frets}
              position={plan.position}
              leftHanded={leftHanded}
              highlights={highlights}
              onTap={tap}
              disabled={current.answer !== null}
              size={short ? "page" : "pad"}
              legend={current.answer !== null}
            />
          </div>
          {/* Below the neck, so a phone still shows the note, the instruction and the whole position at once. */}
          {stage === "off" ? (
            current.answer ? null : <PlayOffer onPlay={() => setStage("intro")} />
          ) : stage === "on" ? null : (
            <PlaySetup
              stage={stage}
              onTune={() => setStage("tune")}
              onReady={() => {
                // Straight from the Done/Skip press, so the browser counts it as the student's own gesture.
                void listening.start();
                setStage("on");
                window.scrollTo({ top: 0 });
                // The note on screen was shown before the setup: its time starts now, as the listening does.
                setAsked((list) => list.map((a, i) => (i === list.length - 1 && !a.answer ? { ...a, shownAt: performance.now() } : a)));
              }}
              onCancel={() => setStage("off")}
            />
          )}
          {/* The reason names the note, so it waits for the answer. */}
          {current.answer ? (
            <p className="rounded-xl bg-sky/10 px-3 py-2 text-base">
              <Icon name="info" className="mr-1 inline h-5 w-5 align-text-bottom" />
              <strong>Why this note:</strong> {current.choice.reason}
            </p>
          ) : null}
          <div className="flex justify-end">
            <QueueLine status={status} />
          </div>
          {current.answer ? (
            finished ? (
              <Summary asked={asked.slice(roundStart.current)} states={states} plan={plan} onAgain={start} />
            ) : (
              // Under the thumb: pinned to the bottom of a phone's screen.
              <div ref={nextBar} className="fixed inset-x-0 bottom-0 z-10 border-t border-ink/10 bg-paper/95 p-3 sm:static sm:border-0 sm:bg-transparent sm:p-0">
                <Button tone="teal" className="min-h-14 w-full text-xl" onClick={next} autoFocus>
                  Next note
                  <Icon name="play" className="h-5 w-5" />
                </Button>
              </div>
            )
          ) : null}
        </>
      )}

      <div className="mt-2 flex flex-wrap items-center justify-between gap-3 border-t border-ink/10 pt-3">
        <SoundControl />
        <LeftHandedToggle value={leftHanded} onChange={setLeftHanded} className="text-sm" />
        <NoteNamingChoice className="text-sm" />
      </div>
      {status.dropped.length > 0 ? (
        <Notice tone="error">
          {status.dropped.length === 1 ? "One answer" : `${status.dropped.length} answers`} could not be saved and were left out:{" "}
          {status.dropped.map((d) => d.message).join(" ")}
        </Notice>
      ) : null}
    </div>
  );
}

/** Which assignment this practice counts toward, as the server decided (creditedAssignment). */
function CountsToward({ assignment }: { assignment: NonNullable<PracticePlan["countsToward"]> }) {
  return (
    // One line on a phone (the rest is cut short, and readable on wider screens) so the neck stays above the fold.
    <p data-counts-toward className="truncate text-sm sm:whitespace-normal">
      <Icon name="check" className="mr-1 inline h-4 w-4 align-[-0.15em] text-teal" />
      Counts toward your assignment <strong>{assignment.title}</strong> ({assignment.className}, due <DueTime ms={assignment.dueAt} />)
      {assignment.playedOnly ? (
        <>
          {" "}
          · <Icon name="mic" className="mx-1 inline h-4 w-4 align-[-0.15em]" />
          only notes you play on your guitar count: choose “Play on my guitar”
        </>
      ) : null}
    </p>
  );
}

function StartCard({ count, onStart }: { count: number; onStart: () => void }) {
  return (
    <Card className="text-center">
      <p className="text-lg">
        {plural(count, "note")}, one at a time. Read the note, then tap its <strong>home spot</strong> on the neck.
      </p>
      <p className="mt-1 text-sm text-ink-soft">You'll hear each note after you answer.</p>
      <Button tone="teal" className="mt-4 w-full text-xl" onClick={onStart}>
        Start practising
      </Button>
    </Card>
  );
}

function Feedback({ asked, playing }: { asked: Asked; playing: boolean }) {
  if (!asked.answer) {
    return (
      <p className="rounded-2xl border-2 border-brass bg-brass/15 p-2 text-center font-display text-xl sm:p-3">
        {playing ? "Play this note on your guitar" : "Tap the home spot of this note"}
      </p>
    );
  }
  const { diagnosis, reactionMs, heard } = asked.answer;
  const home = diagnosis.kind === "home-spot";
  return (
    <div role="status" className={`rounded-2xl px-3 py-2 text-white sm:p-3 ${home ? "bg-teal" : diagnosis.pitchRight ? "bg-sky-light text-ink" : "bg-brick"}`}>
      <p className="font-display text-xl font-semibold sm:text-2xl">
        <Icon name={MISTAKE_ICONS[diagnosis.kind]} className="mr-2 inline h-6 w-6 align-[-0.15em]" />
        {heard ? (diagnosis.pitchRight ? "Right note!" : MISTAKE_LABELS[diagnosis.kind]) : home ? "Home spot!" : MISTAKE_LABELS[diagnosis.kind]}
        <span className="ml-2 text-lg font-normal">{(reactionMs / 1000).toFixed(1)} s</span>
        <span className="ml-2 text-base font-normal">
          <InputBadge input={heard ? "played" : "tap"} />
        </span>
      </p>
      <p className="sm:text-lg">{diagnosis.message}</p>
    </div>
  );
}

function QueueLine({ status }: { status: QueueStatus }) {
  if (status.pending === 0) {
    return status.state === "idle" ? null : (
      <span className="text-sm text-ink-soft">
        <Icon name="check" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
        All answers saved
      </span>
    );
  }
  const why = status.state === "offline" ? "offline — they'll be sent when you're back" : status.state === "signed-out" ? "sign in again to send them" : "sending…";
  return (
    <span role="status" className="rounded-full bg-sky/20 px-3 text-sm">
      <Icon name="again" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
      {status.pending} {status.pending === 1 ? "answer" : "answers"} waiting ({why})
    </span>
  );
}

function Summary({ asked, states, plan, onAgain }: { asked: Asked[]; states: ReturnType<typeof noteStates>; plan: PracticePlan; onAgain: () => void }) {
  const answers = asked.flatMap((a) => (a.answer ? [a.answer] : []));
  const homes = answers.filter((a) => a.diagnosis.kind === "home-spot").length;
  const played = answers.filter((a) => a.heard !== null).length;
  const medianMs = median(answers.filter((a) => a.diagnosis.pitchRight).map((a) => a.reactionMs));
  const seen = plan.notes.filter((n) => states.has(n.writtenMidi));
  const weak = [...seen].sort((a, b) => states.get(a.writtenMidi)!.box - states.get(b.writtenMidi)!.box).filter((n) => states.get(n.writtenMidi)!.box < STEADY_BOX);
  const steady = plan.tuneId !== null && allSteady(plan.notes, states);
  const naming = useNoteNaming();
  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">Session done</h2>
      <p className="text-lg">
        <strong>{homes}</strong> of {answers.length} {played === 0 ? "on the home spot" : played === answers.length ? "right notes, played" : "right (home spot or played)"}
        {medianMs !== null ? <> · median {(medianMs / 1000).toFixed(1)} s</> : null}
      </p>
      <p>
        Steady notes: {seen.filter((n) => states.get(n.writtenMidi)!.box >= STEADY_BOX).length} of {plan.notes.length}
        {seen.some((n) => states.get(n.writtenMidi)!.box === TOP_BOX) ? " (some already at the top box)" : ""}.
        {weak.length > 0 ? ` Still coming back: ${weak.slice(0, 3).map((n) => noteName(n.written, naming)).join(", ")}.` : ""}
      </p>
      {steady ? (
        <Notice tone="success">
          Every note of this tune is steady. <Link to={`/me/rhythm/${encodeURIComponent(plan.tuneId!)}?position=${plan.position}`} className="underline">Try the rhythm pass</Link>.
        </Notice>
      ) : null}
      <p className="rounded-2xl border-2 border-teal/40 bg-teal/10 p-3">
        <strong>Rest your hands.</strong> Shake out your fretting hand and take a few minutes off before the next session; short, regular sessions
        do more than one long one.
      </p>
      <div className="flex flex-wrap gap-3">
        <Button tone="teal" onClick={onAgain}>
          Practise another round
        </Button>
        <Link to="/me" className={buttonClass("ghost")}>
          Back to my practice
        </Link>
      </div>
    </Card>
  );
}
