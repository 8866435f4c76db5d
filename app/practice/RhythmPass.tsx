/**
 * The rhythm pass: one bar of count-in, a click on every beat, and the student taps each note of the tune in time
 * on a big button (or the space bar). The server scores the taps again and stores the pass; the page shows early
 * and late per note.
 */
import { nanoid } from "nanoid";
import { useEffect, useRef, useState } from "react";
import { useRevalidator } from "react-router";
import { SoundControl } from "~/components/SoundControl";
import { unlockSound } from "~/components/sound";
import { Staff } from "~/components/Staff";
import { Button, Card, Notice, SelectField } from "~/components/ui";
import { drawnBar } from "~/tunes/bars";
import type { Tune } from "~/tunes/builtin";
import { startClickTrack, type ClickRun } from "./click";
import { CLOSE_MS, DEFAULT_TEMPO, GRADE_WORDS, ON_TIME_MS, scoreTaps, timeline, type Grade, type RhythmScore } from "./rhythm";

const TEMPOS = [60, DEFAULT_TEMPO, 90, 108, 120];
const GRADE_LOOK: Record<Grade, { icon: string; box: string }> = {
  "on-time": { icon: "✓", box: "bg-teal text-white" },
  close: { icon: "≈", box: "bg-sky/30" },
  early: { icon: "←", box: "bg-brick/15" },
  late: { icon: "→", box: "bg-brick/15" },
  missed: { icon: "✗", box: "bg-brick text-white" },
};

type Phase = { kind: "ready" } | { kind: "playing"; run: ClickRun; taps: number[] } | { kind: "done"; score: RhythmScore; saved: "saving" | "saved" | "failed"; id: string; taps: number[] };

export function RhythmPass({ tune, position }: { tune: Tune; position: number }) {
  const [tempo, setTempo] = useState(DEFAULT_TEMPO);
  const [phase, setPhase] = useState<Phase>({ kind: "ready" });
  const [now, setNow] = useState(0);
  const tapsRef = useRef<number[]>([]);
  // A stored pass joins "Your last passes" on the page.
  const { revalidate } = useRevalidator();
  const plan = timeline(tune, tempo);

  // A frame clock while playing: for the beat light and the bar on the staff, not for scoring.
  useEffect(() => {
    if (phase.kind !== "playing") return;
    let frame = 0;
    const tick = () => {
      setNow(performance.now() - phase.run.startPerfMs);
      frame = requestAnimationFrame(tick);
    };
    frame = requestAnimationFrame(tick);
    const end = window.setTimeout(() => finish(phase.run), phase.run.startPerfMs - performance.now() + plan.endMs + plan.beatMs);
    return () => {
      cancelAnimationFrame(frame);
      window.clearTimeout(end);
    };
    // finish reads the taps from the ref; the run identifies the pass.
  }, [phase.kind === "playing" ? phase.run : null]);

  const save = async (id: string, taps: number[]) => {
    try {
      const response = await fetch("/api/v1/practice/rhythm", {
        method: "POST",
        headers: { "Content-Type": "application/json" },
        body: JSON.stringify({ id, tuneId: tune.id, tempo, position, taps }),
      });
      const body = (await response.json()) as RhythmScore & { error?: string };
      setPhase((p) => (p.kind === "done" && p.id === id ? { ...p, saved: response.ok ? "saved" : "failed", score: response.ok ? body : p.score } : p));
      if (response.ok) void revalidate();
    } catch {
      setPhase((p) => (p.kind === "done" && p.id === id ? { ...p, saved: "failed" } : p));
    }
  };

  function finish(run: ClickRun) {
    run.stop();
    const taps = tapsRef.current.map((t) => Math.round(t));
    const id = nanoid();
    setPhase({ kind: "done", score: scoreTaps(tune, tempo, taps), saved: "saving", id, taps });
    void save(id, taps);
  }

  const start = async () => {
    // Inside the tap: the audio context must start here, before any await.
    const context = unlockSound();
    tapsRef.current = [];
    const run = await startClickTrack(context, plan.clicks);
    setPhase({ kind: "playing", run, taps: [] });
  };

  const tap = (timeStamp: number) => {
    if (phase.kind !== "playing") return;
    tapsRef.current.push(timeStamp - phase.run.startPerfMs);
    navigator.vibrate?.(10);
  };

  const beat = Math.floor(now / plan.beatMs);
  const countIn = beat < plan.countIn;
  const current = [...plan.onsets.keys()].findLast((i) => plan.onsets[i]! <= now + plan.beatMs / 2) ?? 0;
  const bar = tune.notes[current]!.bar;
  const barNotes = tune.notes.filter((n) => n.bar === bar);
  const drawn = drawnBar(tune, bar);

  return (
    <div className="space-y-4">
      {phase.kind === "playing" ? (
        <>
          <div className="flex items-center justify-between">
            <p className="font-display text-2xl font-semibold" aria-live="polite">
              {countIn ? `Count-in: ${Math.max(1, beat + 1)}` : `Bar ${bar}`}
            </p>
            <span aria-hidden="true" className={`h-8 w-8 rounded-full ${now >= 0 && now % plan.beatMs < 120 ? "bg-brass" : "bg-ink/10"}`} />
          </div>
          <Card className="p-3">
            <Staff notes={drawn.notes} keyFifths={drawn.keyFifths} size="phone" />
            <p className="text-center text-ink-soft">{barNotes.map((n) => `${n.pitch} (${n.beats} ${n.beats === 1 ? "beat" : "beats"})`).join(" · ")}</p>
          </Card>
          <button
            type="button"
            autoFocus
            onPointerDown={(e) => {
              e.preventDefault();
              tap(e.timeStamp);
            }}
            onKeyDown={(e) => {
              if ((e.key === " " || e.key === "Enter") && !e.repeat) {
                e.preventDefault();
                tap(e.timeStamp);
              }
            }}
            className="flex h-[40vh] w-full touch-manipulation select-none items-center justify-center rounded-3xl bg-rosewood font-display text-4xl font-semibold text-paper active:bg-rosewood/80"
          >
            Tap each note
          </button>
        </>
      ) : (
        <Card className="space-y-4">
          <p className="text-lg">
            One bar of count-in ({plan.countIn} clicks), then tap the big button once for every note, in time with the click. You play the pitches
            on your guitar if you like; the taps are what is timed.
          </p>
          <div className="max-w-xs">
            <SelectField
              label="Tempo"
              name="tempo"
              value={String(tempo)}
              onChange={(e) => setTempo(Number(e.target.value))}
              options={TEMPOS.map((t) => ({ value: String(t), label: `${t} beats per minute${t === DEFAULT_TEMPO ? " (steady)" : ""}` }))}
            />
          </div>
          <Button tone="teal" className="w-full text-xl" onClick={() => void start()}>
            {phase.kind === "done" ? "Play again" : "Start the count-in"}
          </Button>
        </Card>
      )}
      {phase.kind === "done" ? <Results score={phase.score} saved={phase.saved} onRetry={() => void save(phase.id, phase.taps)} /> : null}
      <SoundControl />
    </div>
  );
}

function Results({ score, saved, onRetry }: { score: RhythmScore; saved: "saving" | "saved" | "failed"; onRetry: () => void }) {
  const offsetWords = (ms: number | null) => (ms === null ? "" : ms === 0 ? "exactly" : `${Math.abs(ms)} ms ${ms < 0 ? "early" : "late"}`);
  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">
        Score {score.score} %{" "}
        <span className="text-lg font-normal text-ink-soft">
          · {score.counts["on-time"]} on time, {score.counts.close} close, {score.counts.early + score.counts.late} early or late, {score.counts.missed} missed
          {score.extraTaps ? `, ${score.extraTaps} extra ${score.extraTaps === 1 ? "tap" : "taps"}` : ""}
        </span>
      </h2>
      <p className="text-sm text-ink-soft">
        On time = within {ON_TIME_MS} ms of the beat; close = within {CLOSE_MS} ms.
        {score.meanOffsetMs !== null && Math.abs(score.meanOffsetMs) > ON_TIME_MS
          ? ` On average you were ${offsetWords(score.meanOffsetMs)}${score.meanOffsetMs > 0 ? " — wireless headphones add a delay of their own, so try the phone's speaker" : ""}.`
          : ""}
      </p>
      {saved === "saved" ? (
        <p className="text-sm">
          <span aria-hidden="true">✓ </span>Saved.
        </p>
      ) : saved === "saving" ? (
        <p className="text-sm text-ink-soft">Saving…</p>
      ) : (
        <Notice tone="error">
          Not saved yet (no connection?). <button type="button" onClick={onRetry} className="underline">Send again</button>
        </Notice>
      )}
      <ol className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        {score.notes.map((n) => (
          <li key={n.index} className={`rounded-xl px-3 py-2 ${GRADE_LOOK[n.grade].box}`}>
            <span className="font-semibold">
              {n.index + 1}. {n.pitch}
            </span>{" "}
            <span aria-hidden="true">{GRADE_LOOK[n.grade].icon} </span>
            {GRADE_WORDS[n.grade]}
            {n.offsetMs !== null && n.grade !== "on-time" ? <span className="block text-sm">{offsetWords(n.offsetMs)}</span> : null}
          </li>
        ))}
      </ol>
      <p className="rounded-2xl border-2 border-teal/40 bg-teal/10 p-3">
        <strong>Rest your hands</strong> between passes, and keep headphone volume moderate.
      </p>
    </Card>
  );
}
