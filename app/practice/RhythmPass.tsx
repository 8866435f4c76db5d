/**
 * The rhythm pass: one bar of count-in, a click on every beat, and the student taps each note of the tune in time
 * on a big button (or the space bar), or plays it on the guitar while the microphone listens (after the latency
 * check in LatencyCheck.tsx). The server scores the taps or played onsets again and stores the pass; the page shows
 * early and late per note.
 */
import { nanoid } from "nanoid";
import { useEffect, useRef, useState } from "react";
import { useRevalidator } from "react-router";
import { SoundControl } from "~/components/SoundControl";
import { unlockSound } from "~/components/sound";
import { TuneStaff } from "~/components/TuneStaff";
import { Icon } from "~/components/Icon";
import { Button, Card, Notice, SelectField } from "~/components/ui";
import type { Tune } from "~/tunes/builtin";
import { ListeningHelp, ListeningMeter, PRIVACY_WORDS } from "~/listen/ListeningParts";
import { isStale, playedTaps, type StoredCalibration } from "./calibration";
import { startClickTrack, type ClickRun } from "./click";
import { HEADPHONES, LatencyCheck, readCalibration } from "./LatencyCheck";
import { CLOSE_MS, DEFAULT_TEMPO, defaultTempo, GRADE_WORDS, ON_TIME_MS, scoreTaps, timeline, type Grade, type RhythmScore } from "./rhythm";
import { usePlayAlong } from "./usePlayAlong";
import { day } from "~/review/format";
import { plural } from "~/lib/plural";

const TEMPOS = [60, DEFAULT_TEMPO, 90, 108, 120];
const GRADE_LOOK: Record<Grade, { icon: string; box: string }> = {
  "on-time": { icon: "✓", box: "bg-teal text-white" },
  close: { icon: "≈", box: "bg-sky/30" },
  early: { icon: "←", box: "bg-brick/15" },
  late: { icon: "→", box: "bg-brick/15" },
  missed: { icon: "✗", box: "bg-brick text-white" },
};

type Mode = "tap" | "play";
/** What is sent to the rhythm API: played onsets go as heard, with the calibrated delay the server takes off. */
type PassBody = { id: string; tuneId: string; tempo: number; position: number; taps: number[]; input: "tap" | "played"; latencyMs?: number };
type Phase = { kind: "ready" } | { kind: "playing"; run: ClickRun; mode: Mode } | { kind: "done"; score: RhythmScore; saved: "saving" | "saved" | "failed"; body: PassBody };

export function RhythmPass({ tune, position }: { tune: Tune; position: number }) {
  // The score's own tempo when it marks one; the student may still pick another.
  const scoreTempo = defaultTempo(tune);
  const tempos = [...new Set([...TEMPOS, scoreTempo])].sort((a, b) => a - b);
  const [tempo, setTempo] = useState(scoreTempo);
  const [phase, setPhase] = useState<Phase>({ kind: "ready" });
  const [mode, setMode] = useState<Mode>("tap");
  // Read after hydration: the figure lives on this device only.
  const [calibration, setCalibration] = useState<StoredCalibration | null>(null);
  const [checking, setChecking] = useState(false);
  useEffect(() => setCalibration(readCalibration()), []);
  const playAlong = usePlayAlong();
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
    // A played pass ends when listening does (usePlayAlong); a tapped one here.
    const end = phase.mode === "tap" ? window.setTimeout(() => finish(phase.run), phase.run.startPerfMs - performance.now() + plan.endMs + plan.beatMs) : 0;
    return () => {
      cancelAnimationFrame(frame);
      window.clearTimeout(end);
    };
    // finish reads the taps from the ref; the run identifies the pass.
  }, [phase.kind === "playing" ? phase.run : null]);

  const save = async (pass: PassBody) => {
    const mine = (p: Phase): p is Extract<Phase, { kind: "done" }> => p.kind === "done" && p.body.id === pass.id;
    try {
      const response = await fetch("/api/v1/practice/rhythm", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(pass) });
      const body = (await response.json()) as RhythmScore & { error?: string };
      setPhase((p) => (mine(p) ? { ...p, saved: response.ok ? "saved" : "failed", score: response.ok ? body : p.score } : p));
      if (response.ok) void revalidate();
    } catch {
      setPhase((p) => (mine(p) ? { ...p, saved: "failed" } : p));
    }
  };

  /** Scores at once on the phone (the server scores again from the same body) and sends the pass. */
  const done = (taps: number[], latencyMs?: number) => {
    const played = latencyMs !== undefined;
    const body: PassBody = { id: nanoid(), tuneId: tune.id, tempo, position, taps, input: played ? "played" : "tap", ...(played ? { latencyMs } : {}) };
    setPhase({ kind: "done", score: scoreTaps(tune, tempo, played ? playedTaps(taps, latencyMs) : taps), saved: "saving", body });
    void save(body);
  };

  function finish(run: ClickRun) {
    run.stop();
    done(tapsRef.current.map((t) => Math.round(t)));
  }

  const start = async () => {
    if (mode === "play") {
      const latencyMs = calibration!.offsetMs;
      // Sounds before the first click are the room, not the tune.
      const run = await playAlong.begin(plan.clicks, plan.endMs + plan.beatMs, (onsets) => (onsets ? done(onsets.filter((t) => t >= 0), latencyMs) : setPhase({ kind: "ready" })));
      if (run) setPhase({ kind: "playing", run, mode });
      return;
    }
    // Inside the tap: the audio context must start here, before any await.
    const context = unlockSound();
    tapsRef.current = [];
    const run = await startClickTrack(context, plan.clicks);
    setPhase({ kind: "playing", run, mode });
  };

  const tap = (timeStamp: number) => {
    if (phase.kind !== "playing" || phase.mode !== "tap") return;
    tapsRef.current.push(timeStamp - phase.run.startPerfMs);
    navigator.vibrate?.(10);
  };

  const beat = Math.floor(now / plan.beatMs);
  const countIn = beat < plan.countIn;
  const current = [...plan.onsets.keys()].findLast((i) => plan.onsets[i]! <= now + plan.beatMs / 2) ?? 0;
  const bar = tune.notes[current]!.bar;
  const barNotes = tune.notes.filter((n) => n.bar === bar);

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
            <TuneStaff tune={tune} asked={countIn ? null : current} />
            <p className="text-center text-ink-soft">{barNotes.map((n) => `${n.pitch} (${n.beats} ${n.beats === 1 ? "beat" : "beats"})`).join(" · ")}</p>
          </Card>
          {phase.mode === "play" ? (
            <div className="space-y-3">
              <p className="rounded-3xl bg-rosewood p-6 text-center font-display text-4xl font-semibold text-paper">Play each note</p>
              <ListeningMeter listening={playAlong.listening} />
            </div>
          ) : (
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
          )}
        </>
      ) : mode === "play" && (checking || !calibration) ? (
        <LatencyCheck
          onDone={(c) => {
            setCalibration(c);
            setChecking(false);
          }}
          onTapInstead={() => {
            setChecking(false);
            setMode("tap");
          }}
        />
      ) : (
        <Card className="space-y-4">
          <TuneStaff tune={tune} />
          <fieldset className="flex flex-wrap gap-x-6 gap-y-2">
            <legend className="mb-1 font-semibold">How you give the notes</legend>
            {(
              [
                ["tap", "Tap on the screen"],
                ["play", "Play it on my guitar"],
              ] as const
            ).map(([value, label]) => (
              <label key={value} className="flex min-h-11 items-center gap-2 text-lg">
                <input type="radio" name="rhythm-mode" value={value} checked={mode === value} onChange={() => setMode(value)} className="h-5 w-5" />
                {label}
              </label>
            ))}
          </fieldset>
          {mode === "play" && calibration ? (
            <>
              <p className="text-lg">
                One bar of count-in ({plan.countIn} clicks), then play each note of the tune on your guitar, in time with the click. When each note
                starts is what is timed; the pitch is not judged here.
              </p>
              <p className="flex items-start gap-2 text-ink-soft">
                <Icon name="lock" className="mt-1 h-4 w-4" />
                {PRIVACY_WORDS} Only the click plays while it listens.
              </p>
              <p>{HEADPHONES}</p>
              <p>
                Microphone delay: <strong>{calibration.offsetMs} ms</strong>, measured on this device on{" "}
                <time dateTime={new Date(calibration.at).toISOString()}>{day(calibration.at)}</time>.
                {isStale(calibration, Date.now()) ? " That was a while ago: a new phone or headset changes it." : ""}{" "}
                <button type="button" className="underline" onClick={() => setChecking(true)}>
                  Check it again
                </button>
              </p>
              {playAlong.problem ? <Notice tone="error">{playAlong.problem}</Notice> : null}
              <ListeningHelp status={playAlong.listening.status} />
            </>
          ) : (
            <p className="text-lg">
              One bar of count-in ({plan.countIn} clicks), then tap the big button once for every note, in time with the click. You play the pitches
              on your guitar if you like; the taps are what is timed.
            </p>
          )}
          <div className="max-w-xs">
            <SelectField
              label="Tempo"
              name="tempo"
              value={String(tempo)}
              onChange={(e) => setTempo(Number(e.target.value))}
              options={tempos.map((t) => ({ value: String(t), label: `${t} beats per minute${tune.score?.tempo && t === scoreTempo ? " (the score's tempo)" : t === DEFAULT_TEMPO ? " (steady)" : ""}` }))}
            />
          </div>
          <Button tone="teal" className="w-full text-xl" onClick={() => void start()} disabled={playAlong.listening.status === "asking"}>
            {playAlong.listening.status === "asking" ? "Waiting for the microphone…" : phase.kind === "done" ? "Play again" : "Start the count-in"}
          </Button>
        </Card>
      )}
      {phase.kind === "done" ? <Results score={phase.score} saved={phase.saved} played={phase.body.input === "played"} onRetry={() => void save(phase.body)} /> : null}
      <SoundControl />
    </div>
  );
}

function Results({ score, saved, played, onRetry }: { score: RhythmScore; saved: "saving" | "saved" | "failed"; played: boolean; onRetry: () => void }) {
  const offsetWords = (ms: number | null) => (ms === null ? "" : ms === 0 ? "exactly" : `${Math.abs(ms)} ms ${ms < 0 ? "early" : "late"}`);
  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">
        Score {score.score} %{" "}
        <span className="text-lg font-normal text-ink-soft">
          · {score.counts["on-time"]} on time, {score.counts.close} close, {score.counts.early + score.counts.late} early or late, {score.counts.missed} missed
          {score.extraTaps ? `, ${plural(score.extraTaps, played ? "extra note" : "extra tap")}` : ""}
        </span>
      </h2>
      <p className="text-sm text-ink-soft">
        On time = within {ON_TIME_MS} ms of the beat; close = within {CLOSE_MS} ms.
        {score.meanOffsetMs !== null && Math.abs(score.meanOffsetMs) > ON_TIME_MS
          ? ` On average you were ${offsetWords(score.meanOffsetMs)}${
              played
                ? " — if every note was off by about the same, check the microphone's delay again"
                : score.meanOffsetMs > 0
                  ? " — wireless headphones add a delay of their own, so try the phone's speaker"
                  : ""
            }.`
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
