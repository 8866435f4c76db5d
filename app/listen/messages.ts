// What the detector's Worker and the listening hook say to each other.
import type { HeardNote } from "./detector";

export type ToDetector = { type: "start"; sampleRate: number; frames: MessagePort } | { type: "stop" };

/** Times are in the audio context's clock (ms); the hook moves them to the page's clock. */
export type FromDetector =
  | { type: "note"; note: HeardNote }
  | { type: "state"; level: number; current: { midi: number; cents: number; hz: number } | null };

/** A block of microphone samples and the context frame of its first sample, from the capture worklet. */
export interface SampleBlock {
  samples: Float32Array;
  frame: number;
}
