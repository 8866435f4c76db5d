// The one place that opens the microphone. Audio goes microphone → AudioWorklet (copies blocks) → Worker (detector);
// the page only receives counted notes and a meter reading. Nothing is sent over the network or stored.
import { useCallback, useEffect, useRef, useState } from "react";
import { heardAtMs, inputLatencyMs as measureInputLatency, stampClocks, type ClockStamp } from "./clock";
import type { HeardNote } from "./detector";
import type { FromDetector, ToDetector } from "./messages";
import captureWorkletUrl from "./capture.worklet.ts?worker&url";

export type ListeningStatus = "idle" | "asking" | "listening" | "denied" | "missing" | "failed";

export interface Listening {
  status: ListeningStatus;
  level: number /* RMS 0..1 */;
  current: { midi: number; cents: number; hz: number } | null;
  inputLatencyMs: number;
  start(): Promise<void>;
  stop(): void;
}

// The clocks drift apart slowly; a fresh pairing every second keeps the error far below a millisecond.
const RESTAMP_MS = 1000;

interface Session {
  stream: MediaStream;
  context: AudioContext;
  worker: Worker;
  node: AudioWorkletNode;
  timer: ReturnType<typeof setInterval>;
}

function failureStatus(error: unknown): ListeningStatus {
  const name = (error as { name?: string } | null)?.name;
  if (name === "NotAllowedError" || name === "SecurityError") return "denied";
  if (name === "NotFoundError" || name === "OverconstrainedError" || name === "NotReadableError") return "missing";
  return "failed";
}

export function useListening(opts: { onNote: (note: HeardNote) => void }): Listening {
  const [status, setStatus] = useState<ListeningStatus>("idle");
  const [level, setLevel] = useState(0);
  const [current, setCurrent] = useState<Listening["current"]>(null);
  const [latency, setLatency] = useState(0);
  const onNote = useRef(opts.onNote);
  onNote.current = opts.onNote;
  const session = useRef<Session | null>(null);
  // A start() still waiting for permission when stop() is called must not open a session afterwards.
  const attempt = useRef(0);

  const stop = useCallback(() => {
    attempt.current++;
    const s = session.current;
    session.current = null;
    if (s) {
      clearInterval(s.timer);
      s.node.port.postMessage({ stop: true });
      s.node.disconnect();
      s.worker.postMessage({ type: "stop" } satisfies ToDetector);
      s.worker.terminate();
      for (const track of s.stream.getTracks()) track.stop();
      void s.context.close().catch(() => undefined);
    }
    setLevel(0);
    setCurrent(null);
    setStatus((was) => (was === "listening" || was === "asking" ? "idle" : was));
  }, []);

  const start = useCallback(async () => {
    if (session.current) return;
    const mine = ++attempt.current;
    if (typeof navigator === "undefined" || !navigator.mediaDevices?.getUserMedia || typeof AudioWorkletNode === "undefined") {
      setStatus("missing");
      return;
    }
    setStatus("asking");
    let stream: MediaStream;
    try {
      // Raw sound: echo cancelling, noise suppression and gain riding all smear a plucked note's attack and pitch.
      stream = await navigator.mediaDevices.getUserMedia({
        audio: { echoCancellation: false, noiseSuppression: false, autoGainControl: false },
      });
    } catch (error) {
      if (mine === attempt.current) setStatus(failureStatus(error));
      return;
    }
    if (mine !== attempt.current) {
      for (const track of stream.getTracks()) track.stop();
      return;
    }
    let context: AudioContext | null = null;
    let worker: Worker | null = null;
    try {
      context = new AudioContext({ latencyHint: "interactive" });
      await context.audioWorklet.addModule(captureWorkletUrl);
      const source = context.createMediaStreamSource(stream);
      const node = new AudioWorkletNode(context, "fretcall-capture", { numberOfInputs: 1, numberOfOutputs: 0 });
      worker = new Worker(new URL("./detect.worker.ts", import.meta.url), { type: "module" });
      const channel = new MessageChannel();
      worker.postMessage({ type: "start", sampleRate: context.sampleRate, frames: channel.port2 } satisfies ToDetector, [channel.port2]);
      node.port.postMessage({ worker: channel.port1 }, [channel.port1]);
      source.connect(node);
      await context.resume();
      if (mine !== attempt.current) throw new Error("stopped while starting");

      const settings = stream.getAudioTracks()[0]?.getSettings() as (MediaTrackSettings & { latency?: number }) | undefined;
      const inputMs = measureInputLatency(settings?.latency, context.baseLatency);
      const ctx = context;
      let stamp: ClockStamp = stampClocks(ctx, performance.now());
      const timer = setInterval(() => {
        stamp = stampClocks(ctx, performance.now());
      }, RESTAMP_MS);
      worker.onmessage = (event: MessageEvent<FromDetector>) => {
        const message = event.data;
        if (message.type === "state") {
          setLevel(message.level);
          setCurrent(message.current);
          return;
        }
        const { note } = message;
        onNote.current({
          ...note,
          onsetMs: heardAtMs(note.onsetMs, stamp, inputMs),
          countedMs: heardAtMs(note.countedMs, stamp, inputMs),
        });
      };
      worker.onerror = () => {
        stop();
        setStatus("failed");
      };
      session.current = { stream, context, worker, node, timer };
      setLatency(inputMs);
      setStatus("listening");
    } catch (error) {
      worker?.terminate();
      for (const track of stream.getTracks()) track.stop();
      void context?.close().catch(() => undefined);
      if (mine === attempt.current) setStatus(failureStatus(error));
    }
  }, [stop]);

  // Leaving the page turns the microphone off.
  useEffect(() => stop, [stop]);

  return { status, level, current, inputLatencyMs: latency, start, stop };
}
