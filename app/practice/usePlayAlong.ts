// Playing along with the click while the microphone listens: the latency check and the rhythm pass by playing
// both use it. It opens the microphone (through useListening, the one place that does), starts the click once
// listening, collects the onsets heard (ms from the first click) and hands them over when the run ends. Nothing but
// the click plays meanwhile. Stop (the listening indicator's button) ends the run with nothing kept.
import { useCallback, useEffect, useRef, useState } from "react";
import { getSoundPrefs, unlockSound } from "~/components/sound";
import type { HeardNote } from "~/listen/detector";
import { nearestNote } from "~/listen/pitch";
import { useListening } from "~/listen/useListening";
import { CLICK_HZ, startClickTrack, type ClickRun } from "./click";

// The click heard back through the microphone is not a note the student played (no guitar note sits on its pitches
// in a rhythm pass: they are above the top of the neck, written an octave higher still).
const CLICK_MIDI = new Set(CLICK_HZ.map((hz) => nearestNote(hz).midi));

type Clicks = readonly { at: number; accent: boolean }[];
/** The onsets heard, ms from the first click, in order; null when the run was stopped. */
type OnEnd = (onsetsMs: number[] | null) => void;

interface Pending {
  context: AudioContext | null;
  clicks: Clicks;
  /** How long after the first click to keep listening. */
  endMs: number;
  onEnd: OnEnd;
  started: (run: ClickRun | null) => void;
}

export function usePlayAlong() {
  const runRef = useRef<{ run: ClickRun; onEnd: OnEnd; timer: number } | null>(null);
  const onsets = useRef<number[]>([]);
  const onNote = useCallback((note: HeardNote) => {
    const current = runRef.current;
    if (current && !CLICK_MIDI.has(note.midi)) onsets.current.push(note.onsetMs - current.run.startPerfMs);
  }, []);
  const listening = useListening({ onNote });
  const [pending, setPending] = useState<Pending | null>(null);
  const [running, setRunning] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);

  const finish = useCallback(
    (keep: boolean) => {
      const current = runRef.current;
      if (!current) return;
      runRef.current = null;
      window.clearTimeout(current.timer);
      current.run.stop();
      setRunning(false);
      // The microphone is on only while it is needed.
      listening.stop();
      current.onEnd(keep ? [...onsets.current].sort((a, b) => a - b).map(Math.round) : null);
    },
    [listening.stop],
  );

  /**
   * Call inside the student's tap (the click's audio context starts there). Resolves with the run once the click
   * has started, or null when the microphone or the sound could not.
   */
  const begin = useCallback(
    (clicks: Clicks, endMs: number, onEnd: OnEnd) =>
      new Promise<ClickRun | null>((started) => {
        if (getSoundPrefs().muted) {
          setProblem("Sound is off, and playing along needs the click: turn sound on below, then start again.");
          return started(null);
        }
        setProblem(null);
        setPending({ context: unlockSound(), clicks, endMs, onEnd, started });
        void listening.start();
      }),
    [listening.start],
  );

  // The click starts only once the microphone is listening, so the first notes are heard.
  useEffect(() => {
    if (!pending) return;
    if (listening.status === "listening") {
      setPending(null);
      onsets.current = [];
      void startClickTrack(pending.context, pending.clicks).then((run) => {
        const timer = window.setTimeout(() => finish(true), run.startPerfMs - performance.now() + pending.endMs);
        runRef.current = { run, onEnd: pending.onEnd, timer };
        setRunning(true);
        pending.started(run);
      });
    } else if (listening.status !== "asking") {
      // Refused, missing or failed: the listening help says what to do.
      setPending(null);
      pending.started(null);
    }
  }, [pending, listening.status]);

  // Stop pressed while playing along: the run ends and nothing is kept.
  useEffect(() => {
    if (running && listening.status !== "listening") finish(false);
  }, [running, listening.status]);

  // Leaving the page mid-run stops the click too.
  useEffect(() => () => finish(false), [finish]);

  return { listening, begin, running, problem };
}
