/**
 * A solo practice session on a phone: the note on the staff, the fretboard beneath, feedback in plain words and
 * the sound of the note after each answer. The adaptive rule picks each note from the student's history and this
 * session's answers; finished answers go to the outbox (useAnswerQueue), so a dropped connection loses nothing.
 */
import { nanoid } from "nanoid";
import { useMemo, useRef, useState } from "react";
import { Link } from "react-router";
import { Fretboard, type Highlight } from "~/components/Fretboard";
import { SoundControl } from "~/components/SoundControl";
import { playSounding } from "~/components/sound";
import { Staff } from "~/components/Staff";
import { LeftHandedToggle, useLeftHanded } from "~/components/LeftHanded";
import { Button, buttonClass, Card, Notice } from "~/components/ui";
import { median } from "~/lib/median";
import { soundingMidi, type Spot } from "~/music/fretboard";
import { diagnose, MISTAKE_ICONS, MISTAKE_LABELS, type Diagnosis } from "~/music/mistakes";
import { seededRandom } from "~/music/pools";
import { resolveTuning } from "~/music/tuning";
import { allSteady, chooseNext, noteName, noteStates, STEADY_BOX, TOP_BOX, type Choice, type PracticeAnswer } from "./adaptive";
import type { PracticePlan } from "./pool";
import { useAnswerQueue, type QueueStatus } from "./useAnswerQueue";

interface Asked {
  choice: Choice;
  shownAt: number;
  answer: { spot: Spot; diagnosis: Diagnosis; reactionMs: number } | null;
}

const localMidnight = () => new Date(new Date().setHours(0, 0, 0, 0)).getTime();

export function PracticeSession({ userId, plan, history, count }: { userId: string; plan: PracticePlan; history: PracticeAnswer[]; count: number }) {
  const tuning = useMemo(() => resolveTuning(plan.tuning), [plan.tuning]);
  const { status, add } = useAnswerQueue(userId);
  const [leftHanded, setLeftHanded] = useLeftHanded();
  const [mine, setMine] = useState<PracticeAnswer[]>([]);
  const [asked, setAsked] = useState<Asked[]>([]);
  const random = useRef<() => number>(() => 0);
  const roundStart = useRef(0);

  const current = asked.at(-1) ?? null;
  const inRound = asked.length - roundStart.current;
  const finished = current !== null && current.answer !== null && inRound >= count;
  const states = useMemo(() => noteStates([...history, ...mine], localMidnight()), [history, mine]);

  const ask = (previous: number | undefined, list: Asked[]) => {
    const choice = chooseNext(plan.notes, noteStates([...history, ...mine], localMidnight()), { previous, random: random.current });
    setAsked([...list, { choice, shownAt: performance.now(), answer: null }]);
  };

  const start = () => {
    random.current = seededRandom(Date.now());
    roundStart.current = asked.length;
    ask(current?.choice.note.writtenMidi, asked);
  };

  const tap = (spot: Spot) => {
    if (!current || current.answer) return;
    const note = plan.notes.find((n) => n.writtenMidi === current.choice.note.writtenMidi)!;
    const reactionMs = Math.max(0, Math.round(performance.now() - current.shownAt));
    const diagnosis = diagnose({ note, keyFifths: plan.keyFifths, tapped: spot, tuning, reading: "guitar", homeOnly: plan.homeOnly });
    void playSounding(soundingMidi(note.writtenMidi, "guitar")).catch(() => undefined);
    navigator.vibrate?.(15);
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
      string: spot.string,
      fret: spot.fret,
      reactionMs,
      at,
    });
    setMine((m) => [...m, { writtenMidi: note.writtenMidi, kind: diagnosis.kind, reactionMs, at }]);
    setAsked((list) => [...list.slice(0, -1), { ...current, answer: { spot, diagnosis, reactionMs } }]);
  };

  const next = () => current && ask(current.choice.note.writtenMidi, asked);

  const note = current ? plan.notes.find((n) => n.writtenMidi === current.choice.note.writtenMidi)! : null;
  const highlights: Highlight[] =
    current?.answer && note
      ? [
          { ...note.home, kind: "home" },
          ...(current.answer.diagnosis.kind === "home-spot"
            ? []
            : [{ ...current.answer.spot, kind: current.answer.diagnosis.pitchRight ? ("tapped-right" as const) : ("tapped-wrong" as const) }]),
        ]
      : [];

  return (
    <div className="-mx-1 flex flex-col gap-3">
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="font-display text-2xl font-semibold">{plan.title}</h1>
        <p className="text-ink-soft">
          Position {plan.position} · {tuning.name}
          {plan.classMap ? " · your class's home spots" : ""}
        </p>
      </header>
      {plan.outside.length > 0 ? (
        <Notice tone="info">Some notes of this tune lie outside position {plan.position} and are left out: {plan.outside.join(", ")}.</Notice>
      ) : null}

      {current === null ? (
        <StartCard count={count} onStart={start} />
      ) : (
        <>
          <div className="flex items-center justify-between text-lg">
            <span aria-live="polite">
              Note {Math.min(inRound, count)} of {count}
            </span>
            <QueueLine status={status} />
          </div>
          <div aria-hidden="true" className="h-2 overflow-hidden rounded-full bg-ink/10">
            <div className="h-full bg-brass" style={{ width: `${(100 * Math.min(inRound, count)) / count}%` }} />
          </div>
          <Card className="p-3">
            <div data-written={note!.written} data-written-midi={note!.writtenMidi}>
              <Staff notes={[{ written: note!.written }]} keyFifths={plan.keyFifths} size="phone" />
            </div>
            <p className="mt-1 rounded-xl bg-sky/10 px-3 py-2 text-base">
              <span aria-hidden="true">i </span>
              <strong>Why this note:</strong> {current.choice.reason}
            </p>
          </Card>
          <Feedback asked={current} />
          <Fretboard
            tuning={tuning}
            frets={plan.frets}
            position={plan.position}
            leftHanded={leftHanded}
            highlights={highlights}
            onTap={tap}
            disabled={current.answer !== null}
            size="pad"
            legend={current.answer !== null}
          />
          {current.answer ? (
            finished ? (
              <Summary asked={asked.slice(roundStart.current)} states={states} plan={plan} onAgain={start} />
            ) : (
              <Button tone="teal" className="w-full text-xl" onClick={next} autoFocus>
                Next note ▶
              </Button>
            )
          ) : null}
        </>
      )}

      <div className="mt-2 flex flex-wrap items-center justify-between gap-3 border-t border-ink/10 pt-3">
        <SoundControl />
        <LeftHandedToggle value={leftHanded} onChange={setLeftHanded} className="text-sm" />
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

function StartCard({ count, onStart }: { count: number; onStart: () => void }) {
  return (
    <Card className="text-center">
      <p className="text-lg">
        {count} notes, one at a time. Read the note, then tap its <strong>home spot</strong> on the neck.
      </p>
      <p className="mt-1 text-sm text-ink-soft">You'll hear each note after you answer.</p>
      <Button tone="teal" className="mt-4 w-full text-xl" onClick={onStart}>
        Start practising
      </Button>
    </Card>
  );
}

function Feedback({ asked }: { asked: Asked }) {
  if (!asked.answer) return <p className="rounded-2xl border-2 border-brass bg-brass/15 p-3 text-center font-display text-xl">Tap the home spot of this note</p>;
  const { diagnosis, reactionMs } = asked.answer;
  const home = diagnosis.kind === "home-spot";
  return (
    <div role="status" className={`rounded-2xl p-3 text-white ${home ? "bg-teal" : diagnosis.pitchRight ? "bg-sky text-ink" : "bg-brick"}`}>
      <p className="font-display text-2xl font-semibold">
        <span aria-hidden="true">{MISTAKE_ICONS[diagnosis.kind]} </span>
        {home ? "Home spot!" : MISTAKE_LABELS[diagnosis.kind]}
        <span className="ml-2 text-lg font-normal">{(reactionMs / 1000).toFixed(1)} s</span>
      </p>
      <p className="text-lg">{diagnosis.message}</p>
    </div>
  );
}

function QueueLine({ status }: { status: QueueStatus }) {
  if (status.pending === 0) {
    return status.state === "idle" ? null : (
      <span className="text-sm text-ink-soft">
        <span aria-hidden="true">✓ </span>All answers saved
      </span>
    );
  }
  const why = status.state === "offline" ? "offline — they'll be sent when you're back" : status.state === "signed-out" ? "sign in again to send them" : "sending…";
  return (
    <span role="status" className="rounded-full bg-sky/20 px-3 text-sm">
      <span aria-hidden="true">⟳ </span>
      {status.pending} {status.pending === 1 ? "answer" : "answers"} waiting ({why})
    </span>
  );
}

function Summary({ asked, states, plan, onAgain }: { asked: Asked[]; states: ReturnType<typeof noteStates>; plan: PracticePlan; onAgain: () => void }) {
  const answers = asked.flatMap((a) => (a.answer ? [a.answer] : []));
  const homes = answers.filter((a) => a.diagnosis.kind === "home-spot").length;
  const medianMs = median(answers.filter((a) => a.diagnosis.pitchRight).map((a) => a.reactionMs));
  const seen = plan.notes.filter((n) => states.has(n.writtenMidi));
  const weak = [...seen].sort((a, b) => states.get(a.writtenMidi)!.box - states.get(b.writtenMidi)!.box).filter((n) => states.get(n.writtenMidi)!.box < STEADY_BOX);
  const steady = plan.tuneId !== null && allSteady(plan.notes, states);
  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">Session done</h2>
      <p className="text-lg">
        <strong>{homes}</strong> of {answers.length} on the home spot
        {medianMs !== null ? <> · median {(medianMs / 1000).toFixed(1)} s</> : null}
      </p>
      <p>
        Steady notes: {seen.filter((n) => states.get(n.writtenMidi)!.box >= STEADY_BOX).length} of {plan.notes.length}
        {seen.some((n) => states.get(n.writtenMidi)!.box === TOP_BOX) ? " (some already at the top box)" : ""}.
        {weak.length > 0 ? ` Still coming back: ${weak.slice(0, 3).map((n) => noteName(n.written)).join(", ")}.` : ""}
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
