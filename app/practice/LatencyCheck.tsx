/**
 * The play-along check of the microphone's delay before a rhythm pass by playing: a bar of count-in, then one
 * short note on each of eight clicks. The figure (see calibration.ts) is kept on this device with its date.
 */
import { useEffect, useState } from "react";
import { Button, Card, Notice } from "~/components/ui";
import { ListeningHelp, ListeningMeter, PRIVACY_WORDS } from "~/listen/ListeningParts";
import { Icon } from "~/components/Icon";
import { calibrationRun, CALIBRATION_BPM, CALIBRATION_COUNT_IN, CALIBRATION_PLAYED, measureOffset, parseStoredCalibration, type StoredCalibration } from "./calibration";
import { usePlayAlong } from "./usePlayAlong";

const STORAGE_KEY = "fretcall.rhythm-latency";
// A click the microphone hears back is taken for a fresh attack of a note still ringing, which then counts twice.
export const HEADPHONES = "Wear headphones (wired ones add no delay) at a moderate volume, so the microphone hears your guitar and not the click.";

export function readCalibration(): StoredCalibration | null {
  return typeof localStorage === "undefined" ? null : parseStoredCalibration(localStorage.getItem(STORAGE_KEY));
}

function saveCalibration(offsetMs: number): StoredCalibration {
  const stored = { offsetMs, at: Date.now() };
  try {
    localStorage.setItem(STORAGE_KEY, JSON.stringify(stored));
  } catch {
    // Storage full or blocked: the figure still serves this visit.
  }
  return stored;
}

const run = calibrationRun();
const beat = 60_000 / CALIBRATION_BPM;

export function LatencyCheck({ onDone, onTapInstead }: { onDone: (calibration: StoredCalibration) => void; onTapInstead: () => void }) {
  const { listening, begin, running, problem } = usePlayAlong();
  const [startPerfMs, setStartPerfMs] = useState<number | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const [count, setCount] = useState(-1);

  // The count shown beside the click, for the eye: a tenth of a second is fine, nothing is timed by it.
  useEffect(() => {
    if (!running || startPerfMs === null) return;
    const timer = window.setInterval(() => setCount(Math.floor((performance.now() - startPerfMs) / beat)), 100);
    return () => window.clearInterval(timer);
  }, [running, startPerfMs]);

  const start = async () => {
    setFailure(null);
    setCount(-1);
    const started = await begin(run.clicks, run.endMs, (onsets) => {
      setStartPerfMs(null);
      if (!onsets) return;
      const result = measureOffset(run.played, onsets);
      if (result.ok) onDone(saveCalibration(result.offsetMs));
      else setFailure(result.reason);
    });
    setStartPerfMs(started?.startPerfMs ?? null);
  };

  const words =
    count < 0 ? "Get ready…" : count < CALIBRATION_COUNT_IN ? `Listen: ${count + 1}` : `Play: ${Math.min(CALIBRATION_PLAYED, count - CALIBRATION_COUNT_IN + 1)} of ${CALIBRATION_PLAYED}`;

  return (
    <Card className="space-y-3">
      <h2 className="font-display text-2xl font-semibold">First, check the microphone's delay</h2>
      <p>
        Every phone and headset hears a little late. Play along with the click once so Fretcall can measure it: listen to {CALIBRATION_COUNT_IN}{" "}
        clicks, then play one short note on each of the next {CALIBRATION_PLAYED}. Any note will do; muted strings are fine.
      </p>
      <p>{HEADPHONES}</p>
      {running ? (
        <p className="font-display text-3xl font-semibold" aria-live="polite">
          {words}
        </p>
      ) : (
        <>
          <p className="flex items-start gap-2 text-ink-soft">
            <Icon name="lock" className="mt-1 h-4 w-4" />
            {PRIVACY_WORDS} Only the click plays while it listens.
          </p>
          <Button tone="teal" className="w-full text-xl" onClick={() => void start()} disabled={listening.status === "asking"}>
            {listening.status === "asking" ? "Waiting for the microphone…" : failure ? "Try again" : "Start the clicks"}
          </Button>
        </>
      )}
      {listening.status === "listening" ? <ListeningMeter listening={listening} /> : null}
      {failure ? <Notice tone="error">{failure}</Notice> : null}
      {problem ? <Notice tone="error">{problem}</Notice> : null}
      <ListeningHelp status={listening.status} />
      {!running ? (
        <button type="button" className="underline" onClick={onTapInstead}>
          Tap on the screen instead
        </button>
      ) : null}
    </Card>
  );
}
